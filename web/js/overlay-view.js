// @ts-check
// The drawing over the picture as a view: sizes the canvas to the footage and draws the plan, the
// tracks and whatever is being drawn (overlay.js) whenever one of them, or the frame, changes.

import { drawOverlay } from "./overlay.js";
import { byId } from "./dom.js";

/** @typedef {import("./store.js").PageStore} PageStore */

export class OverlayView {
  /** @param {PageStore} store */
  constructor(store) {
    this.store = store;
    this.canvas = byId("overlay", HTMLCanvasElement);
    const ctx = this.canvas.getContext("2d");
    if (!ctx) throw new Error("this browser cannot draw on the picture");
    this.ctx = ctx;
    this.trails = byId("show-trails", HTMLInputElement);
    this.boxes = byId("show-boxes", HTMLInputElement);
    store.subscribe(["picture"], () => this.size());
    store.subscribe(["plan", "geometry", "selection", "frame", "tracks", "results", "draft"], () => this.redraw());
    window.addEventListener("resize", () => this.redraw());
    this.trails.addEventListener("change", () => this.redraw());
    this.boxes.addEventListener("change", () => this.redraw());
  }

  /** The canvas takes the picture's size in video pixels, and the stage its shape. */
  size() {
    const picture = this.store.picture;
    if (!picture) return;
    const { width: w, height: h } = picture;
    if (this.canvas.width !== w || this.canvas.height !== h) {
      this.canvas.width = w;
      this.canvas.height = h;
    }
    byId("stage", HTMLElement).style.aspectRatio = `${w} / ${h}`;
    byId("stage-empty", HTMLElement).hidden = true;
    this.redraw();
  }

  redraw() {
    const s = this.store;
    const rect = this.canvas.getBoundingClientRect();
    drawOverlay(this.ctx, {
      plan: s.plan,
      frame: s.frame,
      px: rect.width ? this.canvas.width / rect.width : 1,
      selected: s.selected,
      live: s.results ? s.results.live : null,
      tracks: s.tracks,
      showTrails: this.trails.checked,
      showBoxes: this.boxes.checked,
      trailFrames: Math.round(2 * s.fps),
      draft: s.draft,
    });
  }
}
