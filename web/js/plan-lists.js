// @ts-check
// The plan panel's three lists: lines, zones and ground points. Each row is made once per index and
// then updated in place (values, labels, selection), so typing in a row, or tabbing out of it, never
// loses the keyboard focus to a row made anew; rows are only added or removed at the end.

import { el, showValue, Rows } from "./dom.js";
import { setLabel } from "./plan.js";

/** @typedef {import("./plan.js").Plan} Plan */
/** @typedef {(edit: (plan: Plan) => void) => void} Edit */
/** A line's or zone's key colour, by name. @typedef {(name: string) => string} KeyColour */

/**
 * A text field that commits a change with `onChange(text)`.
 * @param {Record<string, unknown>} props
 * @param {(text: string) => void} onChange
 */
function field(props, onChange) {
  const input = el("input", { type: "text", ...props });
  input.addEventListener("change", () => onChange(input.value));
  return input;
}

/**
 * @param {string} text
 * @param {string} title
 * @param {() => void} onClick
 */
function button(text, title, onClick) {
  return el("button", { type: "button", text, title, onclick: onClick });
}

export class LineList {
  /**
   * @param {HTMLElement} list the <ul>
   * @param {Edit} edit
   */
  constructor(list, edit) {
    const hint = el("li", { class: "hint", text: "No lines yet: press Draw line, then click two points." });
    list.replaceChildren(hint);
    this.hint = hint;
    /** @type {Rows<ReturnType<typeof lineRow>>} */
    this.rows = new Rows(list, (i) => lineRow(i, edit), hint);
  }

  /**
   * @param {Plan} plan
   * @param {string | null} selected
   * @param {KeyColour} keyColour
   */
  show(plan, selected, keyColour) {
    this.rows.show(plan.screenlines.length, (row, i) => {
      const line = plan.screenlines[i];
      row.root.classList.toggle("selected", selected === `line:${i}`);
      row.root.style.setProperty("--swatch", keyColour(line.name));
      showValue(row.name, line.name);
      showValue(row.forward, line.forward || "");
      showValue(row.backward, line.backward || "");
      row.flip.setAttribute("aria-label", `Flip direction of ${line.name}`);
      row.remove.setAttribute("aria-label", `Delete ${line.name}`);
      row.forward.setAttribute("aria-label", `Forward label of ${line.name}`);
      row.backward.setAttribute("aria-label", `Backward label of ${line.name}`);
    });
    this.hint.hidden = plan.screenlines.length > 0;
  }
}

/**
 * The row of line `i`: its name, Flip, Delete, and its two direction names, each under a visible
 * caption (forward is the side the gate's teeth point to on the picture).
 * @param {number} i
 * @param {Edit} edit
 */
function lineRow(i, edit) {
  const name = field({ "aria-label": `Name of line ${i + 1}` }, (text) => edit((p) => (p.screenlines[i].name = text.trim() || p.screenlines[i].name)));
  const flip = button("Flip", "Swap which side is forward", () => edit((p) => p.screenlines[i].points.reverse()));
  const remove = button("\u2715", "Delete", () => edit((p) => p.screenlines.splice(i, 1)));
  const forward = field({ placeholder: "e.g. northbound" }, (text) => edit((p) => setLabel(p.screenlines[i], "forward", text)));
  const backward = field({ placeholder: "e.g. southbound" }, (text) => edit((p) => setLabel(p.screenlines[i], "backward", text)));
  const caption = (/** @type {string} */ glyph, /** @type {string} */ dir, /** @type {string} */ text, /** @type {HTMLInputElement} */ input) =>
    el("label", {}, [el("span", { class: `dir ${dir}`, "aria-hidden": "true", text: `${glyph} ` }), text, input]);
  const directions = el("div", { class: "directions" }, [
    caption("\u25B2", "forward", "Forward", forward),
    caption("\u25BC", "backward", "Backward", backward),
  ]);
  const root = el("li", {}, [el("div", { class: "row" }, [name, flip, remove]), directions]);
  return { root, name, flip, remove, forward, backward };
}

export class ZoneList {
  /**
   * @param {HTMLElement} list the <ul>
   * @param {Edit} edit
   */
  constructor(list, edit) {
    // As the lines' list says how to draw one (a newcomer's trial: an empty Zones list said nothing).
    const hint = el("li", { class: "hint", text: "No zones yet: press Draw zone, then click the corners; click the first corner again (or press Enter) to close it." });
    list.replaceChildren(hint);
    this.hint = hint;
    /** @type {Rows<ReturnType<typeof zoneRow>>} */
    this.rows = new Rows(list, (i) => zoneRow(i, edit), hint);
  }

  /**
   * @param {Plan} plan
   * @param {string | null} selected
   * @param {KeyColour} keyColour
   */
  show(plan, selected, keyColour) {
    this.rows.show(plan.zones.length, (row, i) => {
      const zone = plan.zones[i];
      row.root.classList.toggle("selected", selected === `zone:${i}`);
      row.root.style.setProperty("--swatch", keyColour(zone.name));
      showValue(row.name, zone.name);
      row.remove.setAttribute("aria-label", `Delete ${zone.name}`);
    });
    this.hint.hidden = plan.zones.length > 0;
  }
}

/**
 * The row of zone `i`: its name and Delete.
 * @param {number} i
 * @param {Edit} edit
 */
function zoneRow(i, edit) {
  const name = field({ "aria-label": `Name of zone ${i + 1}` }, (text) => edit((p) => (p.zones[i].name = text.trim() || p.zones[i].name)));
  const remove = button("\u2715", "Delete", () => edit((p) => p.zones.splice(i, 1)));
  return { root: el("li", {}, el("div", { class: "row" }, [name, remove])), name, remove };
}

/** Ground points: a hint while there are none, else a table of them and the ground unit. */
export class GroundPointList {
  /**
   * @param {HTMLElement} container
   * @param {Edit} edit
   */
  constructor(container, edit) {
    this.container = container;
    this.hint = el("p", { class: "hint", text: "For speeds: add 4 or more points whose ground position you know (e.g. measured corners of paving)." });
    const body = el("tbody");
    this.table = el("table", { class: "calib-table" }, [
      el("thead", {}, el("tr", {}, ["", "picture x, y", "ground X", "ground Y", ""].map((h) => el("th", { text: h })))),
      body,
    ]);
    this.unit = field({ "aria-label": "Ground unit" }, (text) => edit((p) => { if (p.calibration) p.calibration.unit = text.trim() || "m"; }));
    this.unitLabel = el("label", {}, ["Ground unit ", this.unit]);
    /** What was typed that is not a number, by field. */
    this.problem = el("p", { class: "error", role: "alert" });
    /** @type {Rows<ReturnType<typeof groundRow>>} */
    this.rows = new Rows(body, (i) => groundRow(i, edit, (text) => { this.problem.textContent = text; }));
    container.replaceChildren(this.hint);
  }

  /** @param {Plan} plan */
  show(plan) {
    const pairs = plan.calibration ? plan.calibration.pairs || [] : [];
    const want = pairs.length ? [this.table, this.problem, this.unitLabel] : [this.hint];
    if (this.container.firstChild !== want[0]) this.container.replaceChildren(...want);
    this.rows.show(pairs.length, (row, i) => {
      const pair = pairs[i];
      row.image.textContent = `${pair.image[0]}, ${pair.image[1]}`;
      [row.x, row.y].forEach((input, k) => {
        if (input.getAttribute("aria-invalid") !== "true") showValue(input, numberText(pair.ground[k]));
        input.classList.toggle("missing", typeof pair.ground[k] !== "number");
      });
    });
    if (plan.calibration) showValue(this.unit, plan.calibration.unit || "m");
  }

  /**
   * Puts the keyboard in ground point `i`'s X, to type it next: after the click that added the point
   * has finished moving the focus.
   * @param {number} i
   */
  focusGround(i) {
    requestAnimationFrame(() => {
      const row = this.rows.rows[i];
      if (row) row.x.focus();
    });
  }
}

/** @param {unknown} v */
function numberText(v) {
  return typeof v === "number" ? String(v) : "";
}

/**
 * A typed ground coordinate: a number (a decimal comma is read as a point), null when blank, or
 * undefined when it is not a number.
 * @param {string} text
 */
function groundNumber(text) {
  const t = text.trim().replace(",", ".");
  if (t === "") return null;
  const v = Number(t);
  return Number.isFinite(v) ? v : undefined;
}

/**
 * The row of ground point `i`: its name (G1, G2...), where it is in the picture, its ground X and Y
 * and Delete. Text that is not a number is kept in its field, marked, and said under the table.
 * @param {number} i
 * @param {Edit} edit
 * @param {(problem: string) => void} say
 */
function groundRow(i, edit, say) {
  /** @param {number} k @param {string} label */
  const coordinate = (k, label) => {
    const input = el("input", { type: "text", inputmode: "decimal", autocomplete: "off", "aria-label": label });
    input.addEventListener("change", () => {
      const v = groundNumber(input.value);
      input.setAttribute("aria-invalid", String(v === undefined));
      say(v === undefined ? `${label}: “${input.value}” is not a number. Type it like 8.1 or -2.` : "");
      if (v !== undefined) edit((p) => { if (p.calibration) p.calibration.pairs[i].ground[k] = v; });
    });
    return input;
  };
  const x = coordinate(0, `Ground X of G${i + 1}`);
  const y = coordinate(1, `Ground Y of G${i + 1}`);
  const image = el("td");
  const remove = el("button", { type: "button", text: "\u2715", "aria-label": `Delete G${i + 1}`, onclick: () => edit((p) => {
    if (!p.calibration) return;
    p.calibration.pairs.splice(i, 1);
    if (!p.calibration.pairs.length) delete p.calibration;
  }) });
  const root = el("tr", {}, [el("td", { text: `G${i + 1}` }), image, el("td", {}, x), el("td", {}, y), el("td", {}, remove)]);
  return { root, image, x, y };
}
