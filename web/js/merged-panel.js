// @ts-check
// The Many clips panel: a merged counts file written by `throughline batch` (the counts of a site's
// clips on the clock), read by the core and shown as an interval grid for one camera and class.
// Nothing here depends on the footage or detections open in the page.

import { byId, el } from "./dom.js";

/** @typedef {import("./core-client.js").CoreClient} CoreClient */
/** @typedef {import("./protocol.js").MergedGrid} MergedGrid */

export class MergedPanel {
  /** @param {CoreClient} client */
  constructor(client) {
    this.client = client;
    this.input = byId("open-merged", HTMLInputElement);
    this.name = byId("merged-name", HTMLElement);
    this.choices = byId("merged-choices", HTMLElement);
    this.camera = byId("merged-camera", HTMLSelectElement);
    this.cls = byId("merged-class", HTMLSelectElement);
    this.status = byId("merged-status", HTMLElement);
    this.grid = byId("merged-grid", HTMLElement);
    /** @type {File | null} */
    this.file = null;
    this.input.addEventListener("change", () => {
      const file = this.input.files && this.input.files[0];
      if (file) this.open(file);
      this.input.value = "";
    });
    this.camera.addEventListener("change", () => this.show());
    this.cls.addEventListener("change", () => this.show());
  }

  /** @param {File} file */
  async open(file) {
    this.file = file;
    this.name.textContent = file.name;
    this.camera.replaceChildren();
    this.cls.replaceChildren();
    await this.show();
  }

  async show() {
    if (!this.file) return;
    try {
      const g = await this.client.mergedGrid(this.file, this.camera.value, this.cls.value);
      this.fill(g);
    } catch (e) {
      this.choices.hidden = true;
      this.grid.hidden = true;
      this.status.textContent = `${this.file.name}: ${/** @type {Error} */ (e).message}`;
    }
  }

  /** @param {MergedGrid} g */
  fill(g) {
    if (!this.camera.options.length) {
      this.camera.replaceChildren(...g.cameras.map((c) => el("option", { value: c, text: c || "(one camera)" })));
      this.cls.replaceChildren(el("option", { value: "", text: "all classes" }), ...g.classes.map((c) => el("option", { value: c, text: c })));
    }
    this.camera.value = g.camera;
    this.cls.value = g.class;
    this.choices.hidden = false;
    const partial = g.rows.filter((r) => r.partial).length;
    this.status.textContent = `${g.site}: ${g.rows.length} intervals, ${g.cameras.length} camera${g.cameras.length === 1 ? "" : "s"}`
      + (partial ? `; ${partial} only partly recorded (marked “part”)` : "")
      + ". Counts are estimates: check a sample of each camera against a manual count.";
    // Two heading rows: each line over its directions.
    /** @type {{name: string, span: number}[]} */
    const groups = [];
    for (const c of g.columns) {
      const last = groups[groups.length - 1];
      if (last && last.name === c.screenline) last.span += 1;
      else groups.push({ name: c.screenline, span: 1 });
    }
    const lines = el("tr", {}, [
      el("th", { rowspan: "2", text: "Interval" }),
      ...groups.map((l) => el("th", { colspan: String(l.span), scope: "colgroup", class: "line", text: l.name })),
      el("th", { rowspan: "2", class: "n", text: "All" }),
    ]);
    const directions = el("tr", {}, g.columns.map((c) => el("th", { class: "n", scope: "col", text: c.direction })));
    // A row per interval, its times of day; a heading row where the day changes.
    /** @type {HTMLElement[]} */
    const rows = [];
    let day = "";
    for (const r of g.rows) {
      if (r.start.slice(0, 10) !== day) {
        day = r.start.slice(0, 10);
        rows.push(el("tr", { class: "day" }, [el("th", { colspan: String(g.columns.length + 2), scope: "rowgroup", text: day })]));
      }
      rows.push(el("tr", {}, [
        el("td", { title: `${r.start} to ${r.end}` }, [`${r.start.slice(11, 16)}–${r.end.slice(11, 16)}`, r.partial ? el("span", { class: "part", text: " part" }) : null]),
        ...r.counts.map((n) => el("td", { class: "n", text: String(n) })),
        el("td", { class: "n", text: String(r.total) }),
      ]));
    }
    const caption = el("caption", { text: `${g.site} · ${g.camera || "one camera"} · ${g.class || "all classes"}` });
    this.grid.replaceChildren(el("table", {}, [caption, el("thead", {}, [lines, directions]), el("tbody", {}, rows)]));
    this.grid.hidden = false;
  }
}
