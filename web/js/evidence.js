// @ts-check
// Pictures of the counted objects at their crossings, cut from the footage in this page: a video
// element of its own (the one on screen keeps its place) seeks to the event's frame, the frame is
// drawn, and a square around the object's box is kept, with the line it crossed drawn over it.
// Nothing is uploaded. Pictures are cut one at a time, only when asked for (a row scrolled into
// view, an evidence sheet), and kept until other footage is opened.

import { tracePath, casedStroke } from "./marks.js";
import { countPoint } from "./tracks.js";
import { DIRECTION_COLOUR, PLAN_INK } from "./palette.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./results.js").CountEvent} CountEvent */
/** @typedef {[number, number, number, number]} Box x, y, w, h in video pixels */

/** The picture's side, in pixels (shown at half that, sharp on dense screens). */
const SIDE = 112;
/** The crop around a box: this many times its larger side. */
const MARGIN = 1.6;
/** A box to crop around when the event has none (a crossing added by hand): pixels tall. */
const ADDED_HEIGHT = 60;

export class Evidence {
  /** @param {PageStore} store */
  constructor(store) {
    this.store = store;
    this.video = document.createElement("video");
    this.video.muted = true;
    this.video.playsInline = true;
    this.video.preload = "auto";
    this.video.className = "evidence-video";
    this.video.setAttribute("aria-hidden", "true");
    document.body.append(this.video);
    /** @type {Map<string, Promise<string | null>>} picture URLs by event */
    this.cache = new Map();
    /** @type {string[]} */
    this.urls = [];
    /** @type {Map<string, [number, number, number]>} where each picture was cut: x, y, side in video pixels */
    this.crops = new Map();
    /** @type {Promise<unknown>} the pictures are cut one after another */
    this.queue = Promise.resolve();
    store.subscribe(["footage"], () => this.open());
  }

  /** Whether pictures can be cut: footage is open and plays here. */
  available() {
    return Boolean(this.store.footage && this.store.video.playable);
  }

  open() {
    const footage = this.store.footage;
    for (const u of this.urls) URL.revokeObjectURL(u);
    this.urls = [];
    this.crops.clear();
    this.cache.clear();
    if (this.video.src) URL.revokeObjectURL(this.video.src);
    if (footage) this.video.src = URL.createObjectURL(footage.blob);
  }

  /**
   * The picture of an event (an object URL), cut once and kept; null when it cannot be cut.
   * @param {CountEvent} e
   * @returns {Promise<string | null>}
   */
  picture(e) {
    const key = [e.kind, e.name, e.direction, e.track, e.frame, e.x.toFixed(1), e.y.toFixed(1)].join("|");
    const kept = this.cache.get(key);
    if (kept) return kept;
    const made = this.queue.then(() => (this.available() ? this.cut(e) : null)).catch(() => null);
    this.queue = made;
    this.cache.set(key, made);
    return made;
  }

  /**
   * Seeks to the event's frame and cuts the square around its object.
   * @param {CountEvent} e
   */
  async cut(e) {
    await this.metadata();
    await this.present(e.frame);
    const canvas = document.createElement("canvas");
    canvas.width = SIDE;
    canvas.height = SIDE;
    const ctx = canvas.getContext("2d");
    if (!ctx) return null;
    const [sx, sy, side] = this.cropOf(e);
    ctx.fillStyle = "#0e1118";
    ctx.fillRect(0, 0, SIDE, SIDE);
    ctx.drawImage(this.video, sx, sy, side, side, 0, 0, SIDE, SIDE);
    const k = SIDE / side;
    ctx.setTransform(k, 0, 0, k, -sx * k, -sy * k);
    this.drawWhere(ctx, e, 1 / k);
    const blob = await new Promise((resolve) => canvas.toBlob(resolve, "image/jpeg", 0.85));
    if (!(blob instanceof Blob)) return null;
    const url = URL.createObjectURL(blob);
    this.urls.push(url);
    this.crops.set(url, [sx, sy, side]);
    return url;
  }

  /** Resolves once the video element knows the footage's size and length. */
  metadata() {
    if (this.video.readyState >= 1) return Promise.resolve();
    return new Promise((resolve, reject) => {
      this.video.addEventListener("loadedmetadata", () => resolve(undefined), { once: true });
      this.video.addEventListener("error", () => reject(new Error("footage unreadable")), { once: true });
    });
  }

  /**
   * Shows frame f (1-based) and resolves once it is presented: at the next video frame callback
   * after the seek (drawing on "seeked" alone can give the frame before), or, when none comes (the
   * frame already shown), shortly after "seeked".
   * @param {number} f
   * @returns {Promise<void>}
   */
  present(f) {
    const video = this.video;
    return new Promise((resolve) => {
      let done = false;
      const finish = () => { if (!done) { done = true; resolve(); } };
      if ("requestVideoFrameCallback" in video) video.requestVideoFrameCallback(finish);
      video.addEventListener("seeked", () => setTimeout(finish, 250), { once: true });
      video.currentTime = (f - 0.5) / this.store.fps;
    });
  }

  /**
   * The square to cut: around the event's box, kept inside the picture. [x, y, side] in whole video
   * pixels.
   * @param {CountEvent} e
   * @returns {[number, number, number]}
   */
  cropOf(e) {
    const [x, y, w, h] = this.boxOf(e);
    const W = this.video.videoWidth || 1;
    const H = this.video.videoHeight || 1;
    const side = Math.round(Math.min(Math.max(w, h) * MARGIN, W, H));
    const sx = Math.round(Math.max(0, Math.min(W - side, x + w / 2 - side / 2)));
    const sy = Math.round(Math.max(0, Math.min(H - side, y + h / 2 - side / 2)));
    return [sx, sy, side];
  }

  /**
   * The box of the event's track at its frame whose count point is nearest where it crossed; for a
   * crossing added by hand, a box standing where it was placed.
   * @param {CountEvent} e
   * @returns {Box}
   */
  boxOf(e) {
    const ids = new Set(e.track_ids && e.track_ids.length ? e.track_ids : [e.track]);
    /** @type {Box} */
    let best = [e.x - ADDED_HEIGHT / 4, e.y - ADDED_HEIGHT, ADDED_HEIGHT / 2, ADDED_HEIGHT];
    let bestD = Infinity;
    const tracks = this.store.tracks;
    if (!tracks || e.added) return best;
    for (const f of [e.frame, e.frame - 1]) {
      tracks.forEachBox(f, (id, x, y, w, h) => {
        if (!ids.has(id)) return;
        const [px, py] = countPoint(x, y, w, h, this.store.plan.anchor);
        const d = Math.hypot(px - e.x, py - e.y);
        if (d < bestD) [best, bestD] = [[x, y, w, h], d];
      });
      if (bestD < Infinity) break;
    }
    return best;
  }

  /**
   * The line or zone edge it crossed, and where, over the picture.
   * @param {CanvasRenderingContext2D} ctx
   * @param {CountEvent} e
   * @param {number} px video pixels per picture pixel
   */
  drawWhere(ctx, e, px) {
    const plan = this.store.plan;
    const line = plan.screenlines.find((l) => l.name === e.name);
    const zone = plan.zones.find((z) => z.name === e.name);
    const pts = e.kind === "screenline" ? (line ? line.points : null) : zone ? zone.polygon : null;
    if (pts && pts.length > 1) {
      tracePath(ctx, pts, e.kind === "zone");
      casedStroke(ctx, PLAN_INK, 1.2, px, e.kind === "zone" ? [4, 3] : []);
    }
    ctx.beginPath();
    ctx.arc(e.x, e.y, 4 * px, 0, Math.PI * 2);
    const colour = e.direction === "backward" ? DIRECTION_COLOUR.backward : DIRECTION_COLOUR.forward;
    casedStroke(ctx, colour, 1.6, px);
  }
}
