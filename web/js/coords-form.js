// @ts-check
// Drawing by typing, for the keyboard alone or for exact positions: a line as "x1, y1 → x2, y2"
// (more points make bends), a zone as its corners in order, a ground point as one "x, y". Points are
// in picture pixels, 0, 0 the top-left corner. What cannot be used is said, naming the point and
// what to write instead; nothing is added until all of it can be.

import { byId } from "./dom.js";
import { freshName } from "./plan.js";

/** @typedef {import("./geometry.js").Point} Point */
/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {"line" | "zone" | "ground"} Kind */

/** How many points each kind needs, and how to write them. */
const KINDS = {
  line: { least: 2, most: 50, example: "20, 230 → 620, 230", what: "a line needs its start and its end (more points make bends)" },
  zone: { least: 3, most: 50, example: "30, 260 → 190, 260 → 190, 350 → 30, 350", what: "a zone needs 3 or more corners, in order round it" },
  ground: { least: 1, most: 1, example: "100, 350", what: "a ground point is one point" },
};

/**
 * Reads typed points: pairs "x, y" (or "x y") separated by →, ->, ; or new lines.
 * @param {string} text
 * @param {Kind} kind
 * @param {{width: number, height: number} | null} picture
 * @returns {{points: Point[]} | {error: string}}
 */
export function parsePoints(text, kind, picture) {
  const rule = KINDS[kind];
  const parts = text.split(/→|->|;|\n/).map((t) => t.trim()).filter(Boolean);
  if (!parts.length) return { error: `Type the points, e.g. ${rule.example}.` };
  /** @type {Point[]} */
  const points = [];
  for (const [i, part] of parts.entries()) {
    const nums = part.split(/[\s,]+/).filter(Boolean).map(Number);
    if (nums.length !== 2 || !nums.every(Number.isFinite)) {
      return { error: `Point ${i + 1} (“${part}”) is not two numbers: write x, y, e.g. ${rule.example.split(" → ")[0]}.` };
    }
    const [x, y] = nums;
    if (picture && (x < 0 || y < 0 || x > picture.width || y > picture.height)) {
      return { error: `Point ${i + 1} (${x}, ${y}) is outside the picture, which is ${picture.width} × ${picture.height} pixels.` };
    }
    points.push([x, y]);
  }
  if (points.length < rule.least || points.length > rule.most) {
    return { error: `${points.length} point${points.length === 1 ? "" : "s"} given, but ${rule.what}: e.g. ${rule.example}.` };
  }
  return { points };
}

export class CoordsForm {
  /**
   * @param {PageStore} store
   * @param {{focusGround: (index: number) => void}} hooks `focusGround`: a ground point was added, its X is next to type
   */
  constructor(store, hooks) {
    this.store = store;
    this.hooks = hooks;
    this.kind = byId("coords-kind", HTMLSelectElement);
    this.points = byId("coords-points", HTMLInputElement);
    this.hint = byId("coords-hint", HTMLElement);
    this.error = byId("coords-error", HTMLElement);
    this.done = byId("coords-done", HTMLElement);
    this.kind.addEventListener("change", () => this.showHint());
    byId("coords-form", HTMLFormElement).addEventListener("submit", (e) => {
      e.preventDefault();
      this.add();
    });
    store.subscribe(["picture"], () => this.showHint());
    this.showHint();
  }

  showHint() {
    const rule = KINDS[/** @type {Kind} */ (this.kind.value)];
    const picture = this.store.picture;
    const size = picture ? ` The picture is ${picture.width} × ${picture.height} pixels; 0, 0 is its top-left corner.` : "";
    this.hint.textContent = `For example ${rule.example}: ${rule.what}.${size} Press Enter to add.`;
    this.points.placeholder = rule.example;
  }

  add() {
    const kind = /** @type {Kind} */ (this.kind.value);
    const read = parsePoints(this.points.value, kind, this.store.picture);
    this.done.textContent = "";
    if ("error" in read) {
      this.error.textContent = read.error;
      this.points.setAttribute("aria-invalid", "true");
      return;
    }
    this.error.textContent = "";
    this.points.removeAttribute("aria-invalid");
    this.points.value = "";
    this.done.textContent = this.addPoints(kind, read.points);
  }

  /**
   * Adds the line, zone or ground point to the plan (one undo step); returns what was done, in words.
   * @param {Kind} kind
   * @param {Point[]} points
   */
  addPoints(kind, points) {
    const store = this.store;
    if (kind === "ground") {
      const index = store.plan.calibration ? (store.plan.calibration.pairs || []).length : 0;
      store.planEdited((p) => {
        p.calibration = p.calibration || { pairs: [], unit: "m" };
        p.calibration.pairs = p.calibration.pairs || [];
        p.calibration.pairs.push({ image: points[0], ground: [null, null] });
      });
      this.hooks.focusGround(index);
      return `Added ground point G${index + 1}: type its ground X and Y under Ground points.`;
    }
    const name = freshName(store.plan, kind);
    if (kind === "line") store.planEdited((p) => p.screenlines.push({ name, points }));
    else store.planEdited((p) => p.zones.push({ name, polygon: points }));
    const list = kind === "line" ? store.plan.screenlines : store.plan.zones;
    store.itemSelected(`${kind}:${list.length - 1}`);
    return `Added “${name}”. Name it, and its directions, in the list below.`;
  }
}
