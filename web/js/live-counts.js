// @ts-check
// Running totals from the report's events, for the marks drawn on the picture: each line's counts by
// direction and each zone's entries and exits up to the frame shown, the crossings made so far (each
// leaves a mark where it happened), and which tracks have been counted by then. Nothing is counted
// here: every number is one of the core's events, taken up to a frame.

import { upperBound } from "./geometry.js";

/** @typedef {import("./results.js").Report} Report */
/** @typedef {import("./results.js").CountEvent} CountEvent */
/** @typedef {{forward: number, backward: number}} LineCounts */
/** @typedef {"forward" | "backward"} Direction */
/** A crossing of a line, where and when it happened. @typedef {{frame: number, x: number, y: number, line: string, direction: Direction, inferred: boolean}} Crossing */

export class LiveCounts {
  /** @param {Report | null} report */
  constructor(report) {
    const events = report ? report.events : [];
    /** @type {Map<string, {forward: number[], backward: number[]}>} frames of each line's crossings */
    this.byLine = new Map();
    /** @type {Map<string, {entries: number[], exits: number[]}>} frames of each zone's entries and exits */
    this.byZone = new Map();
    /** @type {Crossing[]} every crossing, by frame */
    this.crossings = [];
    /** @type {Map<number, {frame: number, direction: Direction}[]>} each tracker track's crossings, by frame */
    this.byTrack = new Map();
    for (const line of report ? report.screenlines : []) this.byLine.set(line.name, { forward: [], backward: [] });
    for (const zone of report ? report.zones : []) this.byZone.set(zone.name, { entries: [], exits: [] });
    for (const e of events) this.add(e);
    const byFrame = (/** @type {number} */ a, /** @type {number} */ b) => a - b;
    for (const l of this.byLine.values()) for (const list of [l.forward, l.backward]) list.sort(byFrame);
    for (const z of this.byZone.values()) for (const list of [z.entries, z.exits]) list.sort(byFrame);
    this.crossings.sort((a, b) => a.frame - b.frame);
    this.crossingFrames = this.crossings.map((c) => c.frame);
    for (const list of this.byTrack.values()) list.sort((a, b) => a.frame - b.frame);
  }

  /** @param {CountEvent} e */
  add(e) {
    if (e.kind === "zone") {
      const zone = this.byZone.get(e.name);
      if (zone) (e.direction === "entry" ? zone.entries : zone.exits).push(e.frame);
      return;
    }
    const line = this.byLine.get(e.name);
    if (!line) return;
    /** @type {Direction} */
    const direction = e.direction === "forward" ? "forward" : "backward";
    line[direction].push(e.frame);
    this.crossings.push({ frame: e.frame, x: e.x, y: e.y, line: e.name, direction, inferred: Boolean(e.inferred) });
    for (const id of e.track_ids && e.track_ids.length ? e.track_ids : [e.track]) {
      const list = this.byTrack.get(id) || [];
      list.push({ frame: e.frame, direction });
      this.byTrack.set(id, list);
    }
  }

  /**
   * A line's crossings by direction up to and including frame f (Infinity: all), or null.
   * @param {string} name
   * @param {number} f
   * @returns {LineCounts | null}
   */
  at(name, f) {
    const line = this.byLine.get(name);
    return line ? { forward: upperBound(line.forward, f), backward: upperBound(line.backward, f) } : null;
  }

  /**
   * A zone's entries and exits up to and including frame f (Infinity: all), or null.
   * @param {string} name
   * @param {number} f
   */
  zoneAt(name, f) {
    const zone = this.byZone.get(name);
    return zone ? { entries: upperBound(zone.entries, f), exits: upperBound(zone.exits, f) } : null;
  }

  /**
   * The last `limit` crossings made up to and including frame f.
   * @param {number} f
   * @param {number} limit
   */
  crossingsUpTo(f, limit) {
    const end = upperBound(this.crossingFrames, f);
    return this.crossings.slice(Math.max(0, end - limit), end);
  }

  /**
   * The direction of tracker track `id`'s last crossing up to frame f, or null if not yet counted.
   * @param {number} id
   * @param {number} f
   * @returns {Direction | null}
   */
  countedAs(id, f) {
    const list = this.byTrack.get(id);
    if (!list) return null;
    let last = null;
    for (const c of list) if (c.frame <= f) last = c.direction;
    return last;
  }
}
