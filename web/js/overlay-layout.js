// @ts-check
// Where the labels over the picture go: each line's two count cards (one on each side, the
// direction's name and its running count; while a hand count runs, its key and presses instead) and its name, each zone's name and counts, each ground
// point's name. They are placed once for a plan, its counts and its tracks — not per frame, so they
// hold still while the footage plays — where the tracks seldom go, never over one another, never
// over a gate, and never past the picture's edge (labels.js).

import { LabelBoard } from "./labels.js";
import { tagSize, TAG } from "./marks.js";
import { forwardSide, centroid } from "./geometry.js";
import { actionUnder } from "./tracks.js";
import { DIRECTION_COLOUR, STATE_COLOUR } from "./palette.js";
import { runningCounts } from "./tally.js";

/** @typedef {import("./geometry.js").Point} Point */
/** @typedef {import("./labels.js").Rect} Rect */
/** @typedef {import("./marks.js").TagContent} TagContent */
/** @typedef {import("./plan.js").Plan} Plan */
/** @typedef {import("./live-counts.js").LiveCounts} LiveCounts */
/** A label placed: its place, and its content at a frame. @typedef {{key: string, rect: Rect, content: (frame: number) => TagContent}} Placed */
/** The labels placed, and the board they were placed on (later labels keep clear of them). @typedef {{placed: Placed[], board: LabelBoard}} Layout */

/**
 * What a layout is made from.
 * @typedef {object} LayoutInput
 * @property {Plan} plan
 * @property {number} width the picture's size, video pixels
 * @property {number} height
 * @property {number} px video pixels per screen pixel
 * @property {LiveCounts | null} live
 * @property {import("./tracks.js").ActionGrid | null} action
 * @property {(name: string) => string} keyColour
 * @property {import("./tally.js").TallyRun | null} [tally] a hand count under way: its keys go on the count cards
 */

/** Distances from a gate at which a count card may sit, screen pixels, nearest first (clear of its teeth). */
const OFFSETS = [14, 30, 52];
/** Places along a gate's longest segment, best first. */
const ALONG = [0.5, 0.34, 0.66, 0.2, 0.8, 0.08, 0.92];

/**
 * @param {CanvasRenderingContext2D} ctx used to measure text
 * @param {LayoutInput} input
 * @returns {Layout}
 */
export function layoutLabels(ctx, input) {
  const { plan, width, height, px, action } = input;
  const board = new LabelBoard(width, height, 3 * px, action ? (r) => actionUnder(action, r) : null);
  blockGates(board, plan, px);
  /** @type {Placed[]} */
  const placed = [];
  /** @param {string} key @param {TagContent} widest @param {Point[]} at top-left corners, best first @param {(frame: number) => TagContent} content */
  const put = (key, widest, at, content) => {
    const { w, h } = tagSize(ctx, widest, px);
    const rect = board.place({ w, h, at: at.map(([x, y]) => [x - w / 2, y - h / 2]) });
    if (rect) placed.push({ key, rect, content });
  };
  plan.screenlines.forEach((line, i) => countCards(ctx, input, line, i, put));
  plan.screenlines.forEach((line, i) => {
    const pts = line.points;
    if (pts.length < 2) return;
    const tag = { text: line.name, stripe: input.keyColour(line.name) };
    put(`line:${i}:name`, tag, endPlaces(pts, px), () => tag);
  });
  plan.zones.forEach((zone, i) => zoneTag(input, zone, i, put));
  const pairs = plan.calibration ? plan.calibration.pairs || [] : [];
  pairs.forEach((pair, i) => {
    const done = pair.ground && pair.ground.every((v) => typeof v === "number");
    const tag = { text: done ? `G${i + 1}` : `G${i + 1} ?`, colour: done ? undefined : STATE_COLOUR.doubtful };
    const [x, y] = pair.image;
    const d = 16 * px;
    put(`ground:${i}`, tag, [[x + d, y - d], [x - d, y - d], [x + d, y + d], [x - d, y + d]], () => tag);
  });
  return { placed, board };
}

/**
 * Keeps labels off the gates: small squares along every line.
 * @param {LabelBoard} board
 * @param {Plan} plan
 * @param {number} px
 */
function blockGates(board, plan, px) {
  const s = 5 * px;
  for (const line of plan.screenlines) {
    for (let j = 0; j + 1 < line.points.length; j++) {
      const [a, b] = [line.points[j], line.points[j + 1]];
      const n = Math.max(1, Math.ceil(Math.hypot(b[0] - a[0], b[1] - a[1]) / (8 * px)));
      for (let k = 0; k <= n; k++) {
        const x = a[0] + ((b[0] - a[0]) * k) / n;
        const y = a[1] + ((b[1] - a[1]) * k) / n;
        board.block({ x: x - s / 2, y: y - s / 2, w: s, h: s });
      }
    }
  }
}

/**
 * A line's two count cards: the forward one on the side its teeth point to, the backward one on
 * the other side; each with a triangle pointing the way that direction crosses.
 * @param {CanvasRenderingContext2D} ctx
 * @param {LayoutInput} input
 * @param {import("./plan.js").Screenline} line
 * @param {number} i
 * @param {(key: string, widest: TagContent, at: Point[], content: (frame: number) => TagContent) => void} put
 */
function countCards(ctx, input, line, i, put) {
  const side = forwardSide(line.points);
  if (!side) return;
  const { live, px, tally } = input;
  const total = live ? live.at(line.name, Infinity) : null;
  for (const [dir, sign] of /** @type {const} */ ([["forward", 1], ["backward", -1]])) {
    const n = /** @type {Point} */ ([side.normal[0] * sign, side.normal[1] * sign]);
    const glyph = { colour: DIRECTION_COLOUR[dir], dx: n[0], dy: n[1] };
    const text = line[dir] || dir;
    const key = tally ? tally.keys.find((k) => k.screenline === line.name && k.direction === dir) : undefined;
    /** @param {number} frame */
    const content = (frame) => {
      // While a hand count runs, the card shows its key and the presses so far, not the tool's count.
      if (tally) return { text, glyph, keycap: key ? key.key.toUpperCase() : undefined, count: key ? String(runningCounts(tally).get(key.key) || 0) : undefined };
      const now = live ? live.at(line.name, frame) : null;
      return { text, glyph, count: now ? String(now[dir]) : undefined };
    };
    const widest = tally ? { text, glyph, keycap: key ? key.key.toUpperCase() : undefined, count: key ? "000" : undefined } : { text, glyph, count: total ? String(total[dir]) : undefined };
    const { w, h } = tagSize(ctx, widest, px);
    const reach = (Math.abs(n[0]) * w + Math.abs(n[1]) * h) / 2;
    /** @type {Point[]} */
    const at = [];
    for (const d of OFFSETS) {
      for (const t of ALONG) {
        const [a, b] = side.segment;
        at.push([a[0] + t * (b[0] - a[0]) + n[0] * (d * px + reach), a[1] + t * (b[1] - a[1]) + n[1] * (d * px + reach)]);
      }
    }
    put(`line:${i}:${dir}`, widest, at, content);
  }
}

/**
 * Places for a line's name: beyond either end, then beside them.
 * @param {Point[]} pts
 * @param {number} px
 * @returns {Point[]}
 */
function endPlaces(pts, px) {
  const out = [];
  for (const [end, prev] of [[pts[0], pts[1]], [pts[pts.length - 1], pts[pts.length - 2]]]) {
    const len = Math.hypot(end[0] - prev[0], end[1] - prev[1]) || 1;
    const ux = (end[0] - prev[0]) / len;
    const uy = (end[1] - prev[1]) / len;
    const d = (TAG.height + 6) * px;
    out.push([end[0] + ux * d * 2, end[1] + uy * d], [end[0] - uy * d, end[1] + ux * d], [end[0] + uy * d, end[1] - ux * d]);
  }
  return /** @type {Point[]} */ (out);
}

/**
 * A zone's name with its entries and exits so far, inside the zone where there is room.
 * @param {LayoutInput} input
 * @param {import("./plan.js").Zone} zone
 * @param {number} i
 * @param {(key: string, widest: TagContent, at: Point[], content: (frame: number) => TagContent) => void} put
 */
function zoneTag(input, zone, i, put) {
  if (zone.polygon.length < 3) return;
  const { live } = input;
  const stripe = input.keyColour(zone.name);
  /** @param {number} frame */
  const content = (frame) => {
    const now = live ? live.zoneAt(zone.name, frame) : null;
    return { text: now ? `${zone.name} · in ${now.entries} · out ${now.exits}` : zone.name, stripe };
  };
  const c = centroid(zone.polygon);
  const at = [c, ...zone.polygon.map((p) => /** @type {Point} */ ([(p[0] * 2 + c[0]) / 3, (p[1] * 2 + c[1]) / 3]))];
  put(`zone:${i}`, content(Infinity), at, content);
}
