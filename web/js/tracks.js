// @ts-check
// The tracks the worker sent back, indexed for drawing: one Float32Array, 7 values per box
// (frame 1-based, id, x, y, w, h in pixels top-left + size, observed 1/0), ordered by frame.

import { upperBound } from "./geometry.js";

/** @typedef {import("./geometry.js").Point} Point */
/** @typedef {{forward: number, backward: number, forwardLabel: string, backwardLabel: string}} LineCounts */

export const STRIDE = 7;

export class TrackView {
  /**
   * @param {Float32Array} boxes
   * @param {import("./protocol.js").TrackInfo[]} trackList
   */
  constructor(boxes, trackList) {
    this.boxes = boxes;
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
   * Anchor points of each track over the frames (f - length, f], as a Map id -> [[x, y], ...].
   * @param {number} f
   * @param {number} length
   * @param {string | undefined} anchor the plan's count point: "centre", else the bottom centre
   */
  trails(f, length, anchor) {
    /** @type {Map<number, Point[]>} */
    const out = new Map();
    for (let g = Math.max(1, f - length + 1); g <= f; g++) {
      this.forEachBox(g, (id, x, y, w, h) => {
        /** @type {Point} */
        const p = [x + w / 2, anchor === "centre" ? y + h / 2 : y + h];
        const list = out.get(id);
        if (list) list.push(p);
        else out.set(id, [p]);
      });
    }
    return out;
  }
}

/** Running totals at each screenline from the report's events, for the counters drawn on the picture. */
export class LiveCounts {
  /** @param {import("./results.js").Report | null} report */
  constructor(report) {
    /** @type {Map<string, {forward: number[], backward: number[], forwardLabel: string, backwardLabel: string}>} */
    this.byLine = new Map();
    for (const line of report ? report.screenlines : []) {
      this.byLine.set(line.name, { forward: [], backward: [], forwardLabel: line.forward_label, backwardLabel: line.backward_label });
    }
    for (const e of report ? report.events : []) {
      if (e.kind !== "screenline") continue;
      const line = this.byLine.get(e.name);
      if (line) line[e.direction === "forward" ? "forward" : "backward"].push(e.frame);
    }
    for (const line of this.byLine.values()) {
      line.forward.sort((a, b) => a - b);
      line.backward.sort((a, b) => a - b);
    }
  }

  /**
   * {forward, backward, forwardLabel, backwardLabel} counted up to and including frame f, or null.
   * @param {string} name
   * @param {number} f
   * @returns {LineCounts | null}
   */
  at(name, f) {
    const line = this.byLine.get(name);
    if (!line) return null;
    return {
      forward: upperBound(line.forward, f),
      backward: upperBound(line.backward, f),
      forwardLabel: line.forwardLabel,
      backwardLabel: line.backwardLabel,
    };
  }
}
