// @ts-check
// Drawing and moving plan geometry on the picture with the pointer. Tools: "select" (drag the ends of
// a line, the corners of a zone or a ground point; click a line or zone to select it), "line" (click,
// click; hold Shift to add more points, Enter ends), "zone" (click the corners; click the first corner
// or press Enter to close), "calibration" (click a point whose ground position you know). Each
// drawing tool ends after one line, zone or point (Escape ends it at once), and Move is back.

import { distance, distanceToSegment } from "./geometry.js";
import { freshName } from "./plan.js";

/** @typedef {import("./geometry.js").Point} Point */
/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./store.js").Vertex} Vertex */

const HIT_RADIUS = 10; // screen pixels

/** @param {number} v */
const round = (v) => Math.round(v * 10) / 10;

export class Editor {
  /**
   * @param {HTMLCanvasElement} canvas the picture's overlay
   * @param {PageStore} store
   * @param {{focusGround: (index: number) => void}} hooks `focusGround`: a ground point was added, its X is next to type
   */
  constructor(canvas, store, hooks) {
    this.canvas = canvas;
    this.store = store;
    this.hooks = hooks;
    /** @type {Vertex | null} */
    this.drag = null;
    canvas.addEventListener("pointerdown", (e) => this.down(e));
    canvas.addEventListener("pointermove", (e) => this.move(e));
    // Where the pointer is, in the picture's pixels: to measure a person's height for the detector.
    const at = document.getElementById("pointer-at");
    canvas.addEventListener("pointermove", (e) => {
      const [x, y] = this.toVideo(e);
      if (at) at.textContent = `x ${Math.round(x)}, y ${Math.round(y)}`;
    });
    canvas.addEventListener("pointerleave", () => { if (at) at.textContent = ""; });
    canvas.addEventListener("pointerup", (e) => this.up(e));
    canvas.addEventListener("dblclick", () => this.finish());
  }

  /** Video pixels per screen pixel. */
  scale() {
    const rect = this.canvas.getBoundingClientRect();
    return rect.width ? this.canvas.width / rect.width : 1;
  }

  /**
   * @param {PointerEvent} e
   * @returns {Point}
   */
  toVideo(e) {
    const rect = this.canvas.getBoundingClientRect();
    const s = this.scale();
    return [round((e.clientX - rect.left) * s), round((e.clientY - rect.top) * s)];
  }

  /**
   * The vertex under p, or null.
   * @param {Point} p
   * @returns {Vertex | null}
   */
  vertexAt(p) {
    const r = HIT_RADIUS * this.scale();
    const plan = this.store.plan;
    /** @type {(Vertex & {d: number}) | null} */
    let best = null;
    /** @type {(kind: Vertex["kind"], index: number, vertex: number, q: Point) => void} */
    const consider = (kind, index, vertex, q) => {
      const d = distance(p, q);
      if (d <= r && (!best || d < best.d)) best = { kind, index, vertex, d };
    };
    plan.screenlines.forEach((l, i) => l.points.forEach((q, j) => consider("line", i, j, q)));
    plan.zones.forEach((z, i) => z.polygon.forEach((q, j) => consider("zone", i, j, q)));
    (plan.calibration ? plan.calibration.pairs || [] : []).forEach((g, i) => consider("ground", i, 0, g.image));
    return best;
  }

  /**
   * The line or zone under p as a selection key ("line:2", "zone:0"), or null.
   * @param {Point} p
   */
  itemAt(p) {
    const r = HIT_RADIUS * this.scale();
    const plan = this.store.plan;
    for (let i = 0; i < plan.screenlines.length; i++) {
      const pts = plan.screenlines[i].points;
      for (let j = 0; j + 1 < pts.length; j++) if (distanceToSegment(p, pts[j], pts[j + 1]) <= r) return `line:${i}`;
    }
    for (let i = 0; i < plan.zones.length; i++) if (insidePolygon(p, plan.zones[i].polygon)) return `zone:${i}`;
    return null;
  }

  /**
   * The track whose box in the frame shown holds p (the smallest such box), or null.
   * @param {Point} p
   */
  trackAt(p) {
    let best = null;
    let bestArea = Infinity;
    if (this.store.tracks) {
      this.store.tracks.forEachBox(this.store.frame, (id, x, y, w, h) => {
        if (p[0] >= x && p[0] <= x + w && p[1] >= y && p[1] <= y + h && w * h < bestArea) [best, bestArea] = [id, w * h];
      });
    }
    return best;
  }

  /** @param {PointerEvent} e */
  down(e) {
    if (e.button !== 0) return;
    const p = this.toVideo(e);
    const tool = this.store.tool;
    if (tool === "select") this.grab(p, e.pointerId);
    else if (tool === "calibration") this.addGroundPoint(p);
    else this.addDraftPoint(tool, p, e.shiftKey);
  }

  /**
   * Select tool: starts dragging the vertex under p, or selects the line or zone there.
   * @param {Point} p
   * @param {number} pointerId
   */
  grab(p, pointerId) {
    const hit = this.vertexAt(p);
    if (!hit) {
      const item = this.itemAt(p);
      const track = this.trackAt(p);
      // While reviewing a click on a person or vehicle means that track; while setting up, a line or
      // zone under the pointer comes first.
      if (track !== null && (this.store.view === "review" || item === null)) this.store.focusChosen({ tracks: [track], event: null });
      else this.store.itemSelected(item);
      return;
    }
    this.store.planEdited(() => {}); // one undo step for the whole drag
    this.drag = hit;
    this.canvas.setPointerCapture(pointerId);
    if (hit.kind !== "ground") this.store.itemSelected(`${hit.kind}:${hit.index}`);
  }

  /** @param {Point} p */
  addGroundPoint(p) {
    const plan = this.store.plan;
    const index = plan.calibration ? (plan.calibration.pairs || []).length : 0;
    this.store.planEdited((next) => {
      next.calibration = next.calibration || { pairs: [], unit: "m" };
      next.calibration.pairs = next.calibration.pairs || [];
      next.calibration.pairs.push({ image: p, ground: [null, null] });
    });
    this.store.toolChosen("select"); // one point per use of the tool
    this.hooks.focusGround(index);
  }

  /**
   * Line or zone tool: collects points.
   * @param {"line" | "zone"} tool
   * @param {Point} p
   * @param {boolean} shift
   */
  addDraftPoint(tool, p, shift) {
    const draft = this.store.draft || { kind: tool, points: [] };
    const pts = draft.points;
    const r = HIT_RADIUS * this.scale();
    if (pts.length && distance(pts[pts.length - 1], p) < 3 * this.scale()) return; // a double click
    if (tool === "zone" && pts.length >= 3 && distance(pts[0], p) <= r) {
      this.finish();
      return;
    }
    pts.push(p);
    this.store.draftChanged(draft);
    if (tool === "line" && pts.length >= 2 && !shift) this.finish();
  }

  /** @param {PointerEvent} e */
  move(e) {
    const p = this.toVideo(e);
    if (this.drag) {
      this.store.vertexDragged(this.drag, p);
      return;
    }
    const draft = this.store.draft;
    if (draft) this.store.draftChanged({ ...draft, cursor: p });
    this.canvas.style.cursor = this.store.tool === "select" && this.vertexAt(p) ? "grab" : "crosshair";
  }

  /** @param {PointerEvent} e */
  up(e) {
    if (!this.drag) return;
    this.drag = null;
    this.canvas.releasePointerCapture(e.pointerId);
    // The plan was moved in place; tell everyone once, and keep it.
    this.store.dragEnded();
  }

  /** Ends the line or zone being drawn (Enter, double click, second click, first corner). */
  finish() {
    const d = this.store.draft;
    if (!d) return;
    const plan = this.store.plan;
    if (d.kind === "line" && d.points.length >= 2) {
      const name = freshName(plan, "line");
      this.store.planEdited((p) => p.screenlines.push({ name, points: d.points }));
      this.store.itemSelected(`line:${this.store.plan.screenlines.length - 1}`);
    } else if (d.kind === "zone" && d.points.length >= 3) {
      const name = freshName(plan, "zone");
      this.store.planEdited((p) => p.zones.push({ name, polygon: d.points }));
      this.store.itemSelected(`zone:${this.store.plan.zones.length - 1}`);
    }
    this.store.toolChosen("select");
  }
}

/**
 * @param {Point} p
 * @param {Point[]} poly
 */
function insidePolygon(p, poly) {
  let inside = false;
  for (let i = 0, j = poly.length - 1; i < poly.length; j = i++) {
    const [xi, yi] = poly[i];
    const [xj, yj] = poly[j];
    if (yi > p[1] !== yj > p[1] && p[0] < ((xj - xi) * (p[1] - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
}
