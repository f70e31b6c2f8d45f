// Drawing and moving plan geometry on the picture with the pointer. Tools: "select" (drag the ends of
// a line, the corners of a zone or a ground point; click a line or zone to select it), "line" (click,
// click; hold Shift to add more points, Enter ends), "zone" (click the corners; click the first corner
// or press Enter to close), "calibration" (click a point whose ground position you know).

import { distance, distanceToSegment } from "./geometry.js";
import { freshName } from "./plan.js";

const HIT_RADIUS = 10; // screen pixels

const round = (v) => Math.round(v * 10) / 10;

export class Editor {
  constructor(canvas, store, hooks) {
    this.canvas = canvas;
    this.store = store;
    this.hooks = hooks; // {redraw(), select(key), toolChanged(tool), focusGround(i)}
    this.tool = "select";
    this.draft = null;
    this.drag = null;
    canvas.addEventListener("pointerdown", (e) => this.down(e));
    canvas.addEventListener("pointermove", (e) => this.move(e));
    canvas.addEventListener("pointerup", (e) => this.up(e));
    canvas.addEventListener("dblclick", () => this.finish());
  }

  /** Video pixels per screen pixel. */
  scale() {
    const rect = this.canvas.getBoundingClientRect();
    return rect.width ? this.canvas.width / rect.width : 1;
  }

  toVideo(e) {
    const rect = this.canvas.getBoundingClientRect();
    const s = this.scale();
    return [round((e.clientX - rect.left) * s), round((e.clientY - rect.top) * s)];
  }

  setTool(tool) {
    this.tool = tool;
    this.draft = null;
    this.hooks.toolChanged(tool);
    this.hooks.redraw();
  }

  /** The vertex under p: {kind: "line"|"zone"|"ground", index, vertex}, or null. */
  vertexAt(p) {
    const r = HIT_RADIUS * this.scale();
    const plan = this.store.plan;
    let best = null;
    const consider = (kind, index, vertex, q) => {
      const d = distance(p, q);
      if (d <= r && (!best || d < best.d)) best = { kind, index, vertex, d };
    };
    plan.screenlines.forEach((l, i) => l.points.forEach((q, j) => consider("line", i, j, q)));
    plan.zones.forEach((z, i) => z.polygon.forEach((q, j) => consider("zone", i, j, q)));
    (plan.calibration ? plan.calibration.pairs || [] : []).forEach((g, i) => consider("ground", i, 0, g.image));
    return best;
  }

  /** The line or zone under p as a selection key ("line:2", "zone:0"), or null. */
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

  down(e) {
    if (e.button !== 0) return;
    const p = this.toVideo(e);
    if (this.tool === "select") {
      const hit = this.vertexAt(p);
      if (hit) {
        this.store.change(() => {}, "edit"); // one undo step for the whole drag
        this.drag = hit;
        this.canvas.setPointerCapture(e.pointerId);
        if (hit.kind !== "ground") this.hooks.select(`${hit.kind}:${hit.index}`);
      } else {
        this.hooks.select(this.itemAt(p));
      }
      return;
    }
    if (this.tool === "calibration") {
      const plan = this.store.plan;
      const index = plan.calibration ? (plan.calibration.pairs || []).length : 0;
      this.store.change((next) => {
        next.calibration = next.calibration || { pairs: [], unit: "m" };
        next.calibration.pairs = next.calibration.pairs || [];
        next.calibration.pairs.push({ image: p, ground: [null, null] });
      }, "edit");
      this.hooks.focusGround(index);
      return;
    }
    // Line or zone: collect points.
    if (!this.draft) this.draft = { kind: this.tool, points: [] };
    const pts = this.draft.points;
    const r = HIT_RADIUS * this.scale();
    if (pts.length && distance(pts[pts.length - 1], p) < 3 * this.scale()) return; // a double click
    if (this.tool === "zone" && pts.length >= 3 && distance(pts[0], p) <= r) {
      this.finish();
      return;
    }
    pts.push(p);
    if (this.tool === "line" && pts.length >= 2 && !e.shiftKey) this.finish();
    else this.hooks.redraw();
  }

  move(e) {
    const p = this.toVideo(e);
    if (this.drag) {
      const plan = this.store.plan;
      const { kind, index, vertex } = this.drag;
      if (kind === "line") plan.screenlines[index].points[vertex] = p;
      else if (kind === "zone") plan.zones[index].polygon[vertex] = p;
      else plan.calibration.pairs[index].image = p;
      this.hooks.redraw();
      return;
    }
    if (this.draft) {
      this.draft.cursor = p;
      this.hooks.redraw();
    }
    this.canvas.style.cursor = this.tool === "select" && this.vertexAt(p) ? "grab" : "crosshair";
  }

  up(e) {
    if (!this.drag) return;
    this.drag = null;
    this.canvas.releasePointerCapture(e.pointerId);
    // The plan was moved in place; tell everyone once, and keep it.
    this.store.save();
    this.store.onChange(this.store.plan, "edit");
  }

  /** Ends the line or zone being drawn (Enter, double click, second click, first corner). */
  finish() {
    const d = this.draft;
    if (!d) return;
    this.draft = null;
    if (d.kind === "line" && d.points.length >= 2) {
      const name = freshName(this.store.plan, "line");
      this.store.change((p) => p.screenlines.push({ name, points: d.points }), "edit");
      this.hooks.select(`line:${this.store.plan.screenlines.length - 1}`);
    } else if (d.kind === "zone" && d.points.length >= 3) {
      const name = freshName(this.store.plan, "zone");
      this.store.change((p) => p.zones.push({ name, polygon: d.points }), "edit");
      this.hooks.select(`zone:${this.store.plan.zones.length - 1}`);
    }
    this.setTool("select");
  }
}

function insidePolygon(p, poly) {
  let inside = false;
  for (let i = 0, j = poly.length - 1; i < poly.length; j = i++) {
    const [xi, yi] = poly[i];
    const [xj, yj] = poly[j];
    if (yi > p[1] !== yj > p[1] && p[0] < ((xj - xi) * (p[1] - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
}
