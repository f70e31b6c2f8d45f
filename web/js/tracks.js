// @ts-check
// The tracks the worker sent back, indexed for drawing and for the review lists: one Float32Array,
// 7 values per box (frame 1-based, id, x, y, w, h in pixels top-left + size, observed 1/0), ordered
// by frame. Nothing here counts: it looks boxes up by frame and by track.

/** @typedef {import("./geometry.js").Point} Point */
/** @typedef {[number, number, number, number]} Box x, y, w, h in video pixels, top-left + size */
/** A track's count points over some frames, and whether each was seen (else predicted). @typedef {{pts: Point[], seen: boolean[]}} Path */
/** Where the picture's action is: a grid of cells, each 0 (nothing went there) to 1 (the busiest). @typedef {{cols: number, rows: number, cellW: number, cellH: number, cells: Float32Array}} ActionGrid */

export const STRIDE = 7;

/**
 * A box's count point: its bottom centre, or its centre when the plan counts by centres.
 * @param {number} x
 * @param {number} y
 * @param {number} w
 * @param {number} h
 * @param {string | undefined} anchor the plan's count point
 * @returns {Point}
 */
export function countPoint(x, y, w, h, anchor) {
  return [x + w / 2, anchor === "centre" ? y + h / 2 : y + h];
}

export class TrackView {
  /**
   * @param {Float32Array} boxes
   * @param {import("./protocol.js").TrackInfo[]} trackList
   */
  constructor(boxes, trackList) {
    this.boxes = boxes;
    this.list = trackList;
    this.classes = new Map(trackList.map((t) => [t.id, t.class]));
    // frameStart[f] = index of the first box of frame f (in boxes, not values); frameStart[f+1] ends it.
    const lastFrame = boxes.length ? boxes[boxes.length - STRIDE] : 0;
    this.lastFrame = lastFrame;
    this.frameStart = new Uint32Array(lastFrame + 2);
    let i = 0;
    const n = boxes.length / STRIDE;
    for (let f = 0; f <= lastFrame + 1; f++) {
      while (i < n && boxes[i * STRIDE] < f) i++;
      this.frameStart[f] = i;
    }
    /** @type {Map<number, {first: Box, last: Box}> | null} */
    this.endsCache = null;
  }

  /**
   * Calls fn(id, x, y, w, h, observed) for each box in frame f.
   * @param {number} f
   * @param {(id: number, x: number, y: number, w: number, h: number, observed: boolean) => void} fn
   */
  forEachBox(f, fn) {
    if (f < 1 || f > this.lastFrame) return;
    const b = this.boxes;
    for (let i = this.frameStart[f]; i < this.frameStart[f + 1]; i++) {
      const o = i * STRIDE;
      fn(b[o + 1], b[o + 2], b[o + 3], b[o + 4], b[o + 5], b[o + 6] > 0);
    }
  }

  /**
   * Each track's count points over the frames [from, to], as a Map id -> path; `only` limits it to
   * some tracks.
   * @param {number} from
   * @param {number} to
   * @param {string | undefined} anchor the plan's count point
   * @param {Set<number> | null} [only]
   */
  paths(from, to, anchor, only = null) {
    /** @type {Map<number, Path>} */
    const out = new Map();
    for (let g = Math.max(1, from); g <= Math.min(to, this.lastFrame); g++) {
      this.forEachBox(g, (id, x, y, w, h, seen) => {
        if (only && !only.has(id)) return;
        let path = out.get(id);
        if (!path) out.set(id, (path = { pts: [], seen: [] }));
        path.pts.push(countPoint(x, y, w, h, anchor));
        path.seen.push(seen);
      });
    }
    return out;
  }

  /** Each track's first and last box. */
  ends() {
    if (this.endsCache) return this.endsCache;
    /** @type {Map<number, {first: Box, last: Box}>} */
    const ends = new Map();
    const b = this.boxes;
    for (let o = 0; o < b.length; o += STRIDE) {
      /** @type {Box} */
      const box = [b[o + 2], b[o + 3], b[o + 4], b[o + 5]];
      const e = ends.get(b[o + 1]);
      if (e) e.last = box;
      else ends.set(b[o + 1], { first: box, last: box });
    }
    this.endsCache = ends;
    return ends;
  }

  /**
   * Where the tracks went, over the whole footage: how many boxes covered each cell of a grid over
   * the picture, scaled so the busiest cell is 1. Labels are placed where it is low.
   * @param {number} width the picture's size, video pixels
   * @param {number} height
   * @returns {ActionGrid}
   */
  actionGrid(width, height) {
    const cols = 32;
    const rows = 18;
    const cellW = width / cols;
    const cellH = height / rows;
    const cells = new Float32Array(cols * rows);
    const b = this.boxes;
    for (let o = 0; o < b.length; o += STRIDE) {
      const c0 = Math.max(0, Math.floor(b[o + 2] / cellW));
      const c1 = Math.min(cols - 1, Math.floor((b[o + 2] + b[o + 4]) / cellW));
      const r0 = Math.max(0, Math.floor(b[o + 3] / cellH));
      const r1 = Math.min(rows - 1, Math.floor((b[o + 3] + b[o + 5]) / cellH));
      for (let r = r0; r <= r1; r++) for (let c = c0; c <= c1; c++) cells[r * cols + c] += 1;
    }
    const max = cells.reduce((m, v) => Math.max(m, v), 0);
    if (max > 0) for (let i = 0; i < cells.length; i++) cells[i] /= max;
    return { cols, rows, cellW, cellH, cells };
  }
}

/**
 * How much of the action a rectangle covers: the mean of the grid's cells under it, 0 to 1.
 * @param {ActionGrid} grid
 * @param {{x: number, y: number, w: number, h: number}} r video pixels
 */
export function actionUnder(grid, r) {
  const c0 = Math.max(0, Math.floor(r.x / grid.cellW));
  const c1 = Math.min(grid.cols - 1, Math.floor((r.x + r.w) / grid.cellW));
  const r0 = Math.max(0, Math.floor(r.y / grid.cellH));
  const r1 = Math.min(grid.rows - 1, Math.floor((r.y + r.h) / grid.cellH));
  let sum = 0;
  let n = 0;
  for (let row = r0; row <= r1; row++) {
    for (let c = c0; c <= c1; c++) {
      sum += grid.cells[row * grid.cols + c];
      n++;
    }
  }
  return n ? sum / n : 0;
}
