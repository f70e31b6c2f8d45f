// @ts-check
// The drawing over the picture as a view: sizes the canvas to the footage and draws the frame's
// marks (overlay.js) whenever the frame, the plan, the tracks, the counts or the focus change;
// while a hand count runs, only the plan and each line's tally keys and presses. The
// labels are placed again only when what they depend on changes (overlay-layout.js), so they hold
// still while the footage plays. The labels drawn, and where, are written on the canvas as
// `data-labels` (video pixels), so a test can check that none overlaps another or leaves the picture.

import { drawOverlay } from "./overlay.js";
import { layoutLabels } from "./overlay-layout.js";
import { itemNames } from "./palette.js";
import { byId } from "./dom.js";
import { countPoint } from "./tracks.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./overlay-layout.js").Layout} Layout */

export class OverlayView {
  /**
   * @param {PageStore} store
   * @param {import("./core-client.js").CoreClient} client asked for the focused tracks' paths as counted
   */
  constructor(store, client) {
    this.store = store;
    this.client = client;
    this.canvas = byId("overlay", HTMLCanvasElement);
    const ctx = this.canvas.getContext("2d");
    if (!ctx) throw new Error("this browser cannot draw on the picture");
    this.ctx = ctx;
    this.show = { paths: byId("show-trails", HTMLInputElement), boxes: byId("show-boxes", HTMLInputElement), numbers: byId("show-numbers", HTMLInputElement) };
    /** @type {(Layout & {px: number}) | null} null: to be placed again */
    this.layout = null;
    /** @type {{tracks: unknown, grid: import("./tracks.js").ActionGrid} | null} */
    this.action = null;
    /** @type {import("./overlay.js").Scene["focus"]} */
    this.focus = null;
    /** @type {import("./overlay.js").Scene["focus"] | undefined} the focus last written on the canvas */
    this.focusWritten = undefined;
    /** @param {() => void} [also] */
    const redraw = (also) => () => { if (also) also(); this.redraw(); };
    store.subscribe(["picture"], () => this.size());
    store.subscribe(["plan", "geometry", "tracks", "results", "tally"], redraw(() => { this.layout = null; }));
    store.subscribe(["tallyPress"], redraw());
    store.subscribe(["focus", "tracks", "plan"], redraw(() => { this.focus = this.focusPaths(); }));
    // Asked once the worker has counted with the plan and corrections shown (after the paths above).
    store.subscribe(["focus", "results"], () => this.askCounted());
    /** @type {{ids: number[]} | null} the last request for counted paths, to drop stale answers */
    this.countedAsk = null;
    store.subscribe(["selection", "frame", "draft"], redraw());
    window.addEventListener("resize", redraw(() => { this.layout = null; }));
    for (const box of Object.values(this.show)) box.addEventListener("change", redraw());
  }

  /** The canvas takes the picture's size in video pixels, and the stage its shape. */
  size() {
    const picture = this.store.picture;
    if (!picture) return;
    const { width: w, height: h } = picture;
    if (!(w > 0 && h > 0)) return;
    if (this.canvas.width !== w || this.canvas.height !== h) {
      this.canvas.width = w;
      this.canvas.height = h;
    }
    const stage = byId("stage", HTMLElement);
    stage.style.aspectRatio = `${w} / ${h}`;
    stage.style.setProperty("--aspect", String(w / h));
    byId("stage-empty", HTMLElement).hidden = true;
    this.layout = null;
    this.redraw();
  }

  /**
   * Video pixels per screen pixel of a mark: one, where the picture is shown large; a little less
   * on a small picture (a phone's), so marks and labels leave more of it in view.
   */
  px() {
    const rect = this.canvas.getBoundingClientRect();
    if (!rect.width) return 1;
    return (this.canvas.width / rect.width) * (rect.width < 560 ? 0.82 : 1);
  }

  /** @param {string} name */
  keyColour(name) {
    return this.store.keyColours.colour(name, itemNames(this.store.plan));
  }

  /** Where the tracks went, worked out once per set of tracks. */
  actionGrid() {
    const tracks = this.store.tracks;
    if (!tracks) return null;
    if (!this.action || this.action.tracks !== tracks) this.action = { tracks, grid: tracks.actionGrid(this.canvas.width, this.canvas.height) };
    return this.action.grid;
  }

  /**
   * The focused tracks' whole paths, from their first frame to their last, as measured; their
   * paths as counted stay those last given for the same tracks until the core answers again
   * (`askCounted`), so a correction or a plan change does not flicker the drawing.
   * @returns {import("./overlay.js").Scene["focus"]}
   */
  focusPaths() {
    const { focus, tracks, plan } = this.store;
    if (!focus || !tracks) return null;
    const ids = new Set(focus.tracks);
    const info = tracks.list.filter((t) => ids.has(t.id));
    if (!info.length) return { ids, paths: new Map(), counted: null, steps: [] };
    const from = Math.min(...info.map((t) => t.first_frame));
    const to = Math.max(...info.map((t) => t.last_frame));
    const before = this.focus;
    const kept = before && before.counted && sameIds(before.ids, ids) ? before : null;
    return { ids, paths: tracks.paths(from, to, plan.anchor, ids), counted: kept ? kept.counted : null, steps: kept ? kept.steps : [] };
  }

  /**
   * Asks the core for the focused tracks' paths as counted (averaged under the plan), once there
   * are counts: the answer is drawn unless another request, other counts or another focus came
   * first. A failure is written on the canvas (`data-counted-paths-error`); the measured paths stay.
   */
  askCounted() {
    const f = this.focus;
    const results = this.store.results;
    if (!f || !f.paths.size || !results) {
      this.countedAsk = null;
      return;
    }
    const ask = (this.countedAsk = { ids: [...f.ids] });
    this.client.countedPaths(ask.ids).then((counted) => {
      const now = this.focus;
      if (this.countedAsk !== ask || this.store.results !== results || !now || !sameIds(now.ids, f.ids)) return;
      this.focus = { ...now, counted, steps: joinSteps(results.report.joins, counted) };
      delete this.canvas.dataset.countedPathsError;
      this.redraw();
    }).catch((/** @type {Error} */ e) => {
      if (this.countedAsk === ask) this.canvas.dataset.countedPathsError = e.message;
    });
  }

  /**
   * The focused tracks' paths as drawn, and whether as counted or as measured, written on the
   * canvas for the browser tests: once per focus drawn, not on every frame played.
   */
  writeFocus() {
    const f = (this.focusWritten = this.focus);
    const paths = f ? [...f.paths].map(([id, measured]) => {
      const counted = f.counted ? f.counted.get(id) : undefined;
      return { id, drawn: counted ? "counted" : "measured", pts: (counted || measured).pts.map(([x, y]) => [Math.round(x * 10) / 10, Math.round(y * 10) / 10]) };
    }) : [];
    this.canvas.dataset.focusPaths = JSON.stringify(paths);
    this.canvas.dataset.focusSteps = JSON.stringify(f ? f.steps : []);
  }

  /**
   * Where the moment in focus happened: the chosen crossing; for a doubtful moment, its crossing
   * (counted or rejected), else where its first track was at its frame.
   * @returns {import("./geometry.js").Point | null}
   */
  focusPoint() {
    const { focus, results, tracks, plan } = this.store;
    if (!focus) return null;
    const e = focus.event;
    if (e) return e.kind === "screenline" ? [e.x, e.y] : null;
    const d = focus.doubt;
    if (!d) return null;
    const c = d.crossing;
    if (c) {
      const gone = results ? (results.report.rejected_events || []).find((r) => r.name === c.screenline && r.track === c.track && r.frame === c.frame) : undefined;
      return gone ? [gone.x, gone.y] : null;
    }
    /** @type {import("./geometry.js").Point | null} */
    let at = null;
    if (tracks) tracks.forEachBox(d.frame, (id, x, y, w, h) => { if (id === d.tracks[0]) at = countPoint(x, y, w, h, plan.anchor); });
    return at;
  }

  redraw() {
    const s = this.store;
    const px = this.px();
    // While a hand count runs the tool's marks and counts are hidden, so they do not sway the person counting.
    const tally = s.handCount.run;
    const live = s.results && !tally ? s.results.live : null;
    if (!this.layout || this.layout.px !== px) {
      const input = { plan: s.plan, width: this.canvas.width, height: this.canvas.height, px, live, action: this.actionGrid(), keyColour: (/** @type {string} */ n) => this.keyColour(n), tally };
      this.layout = { ...layoutLabels(this.ctx, input), px };
    }
    const drawn = drawOverlay(this.ctx, {
      plan: s.plan,
      frame: s.frame,
      px,
      selected: s.selected,
      live,
      tracks: tally ? null : s.tracks,
      show: { paths: this.show.paths.checked, boxes: this.show.boxes.checked, numbers: this.show.numbers.checked },
      pathFrames: Math.round(2 * s.fps),
      beadEvery: Math.max(1, Math.round(s.fps / 2)),
      draft: s.draft,
      focus: this.focus,
      focusPoint: this.focusPoint(),
      focusDoubtful: Boolean(s.focus && s.focus.doubt),
      layout: this.layout,
      keyColour: (name) => this.keyColour(name),
    });
    // The keys a hand count shows on the picture, and their presses, for the browser tests to read.
    if (tally) this.canvas.dataset.keycaps = JSON.stringify(this.layout.placed.map((p) => ({ key: p.key, ...p.content(s.frame) })).filter((t) => t.keycap).map(({ key, keycap, count }) => ({ key, keycap, count })));
    else delete this.canvas.dataset.keycaps;
    if (this.focus !== this.focusWritten) this.writeFocus();
    /** @param {import("./labels.js").Rect} r */
    const rounded = (r) => ({ x: Math.round(r.x), y: Math.round(r.y), w: Math.round(r.w), h: Math.round(r.h) });
    this.canvas.dataset.labels = JSON.stringify(drawn.map(({ key, rect, of }) => ({ key, ...rounded(rect), ...(of ? { of: rounded(of) } : {}) })));
  }
}

/**
 * Whether two sets of track ids are the same.
 * @param {Set<number>} a
 * @param {Set<number>} b
 */
function sameIds(a, b) {
  return a.size === b.size && [...a].every((id) => b.has(id));
}

/**
 * Where the counting joined one focused fragment to the next (the report's `joins`): from the
 * first's last counted point to the next one's first, the step its path takes across the gap.
 * @param {{tracks: number[]}[]} joins
 * @param {Map<number, import("./tracks.js").Path>} counted
 * @returns {[import("./geometry.js").Point, import("./geometry.js").Point][]}
 */
function joinSteps(joins, counted) {
  /** @type {[import("./geometry.js").Point, import("./geometry.js").Point][]} */
  const steps = [];
  for (const { tracks } of joins || []) {
    for (let k = 0; k + 1 < tracks.length; k++) {
      const a = counted.get(tracks[k]);
      const b = counted.get(tracks[k + 1]);
      if (a && b && a.pts.length && b.pts.length) steps.push([a.pts[a.pts.length - 1], b.pts[0]]);
    }
  }
  return steps;
}
