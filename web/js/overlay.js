// @ts-check
// Draws one frame's marks over the video (DEVELOPERS.md, "Visual language"): zones, the lines as
// gates with teeth on their forward side, the crossings counted so far, each track's count point and
// path (its box only as four corners), ground points, the labels placed by overlay-layout.js, and
// whatever is being drawn right now. Everything is in video pixels.

import { forwardSide, distanceToSegment } from "./geometry.js";
import { anchorMark, beadedPath, boxCorners, casedStroke, drawTag, tagSize, tracePath, triangle } from "./marks.js";
import { countPoint } from "./tracks.js";
import { CASING, DIRECTION_COLOUR, PLAN_INK, STATE_COLOUR } from "./palette.js";

/** @typedef {import("./geometry.js").Point} Point */
/** @typedef {CanvasRenderingContext2D} Ctx */
/** @typedef {import("./labels.js").Rect} Rect */

/**
 * What to draw for one frame. `px`: video pixels per screen pixel; `pathFrames`: how many frames of
 * each track's path to show; `focus`: the tracks being reviewed (the others are dimmed), their
 * whole paths as measured and, once the core has answered, as counted (`counted`, averaged under
 * the plan's rules, and `steps`: where the counting joined one fragment to the next); `focusPoint`: where the count event being reviewed happened; `focusDoubtful`: the
 * moment in focus is from the doubtful-moments queue (its ring is drawn in the doubtful colour).
 * @typedef {object} Scene
 * @property {import("./plan.js").Plan} plan
 * @property {number} frame
 * @property {number} px
 * @property {string | null} selected
 * @property {import("./live-counts.js").LiveCounts | null} live
 * @property {import("./tracks.js").TrackView | null} tracks
 * @property {{paths: boolean, boxes: boolean, numbers: boolean}} show
 * @property {number} pathFrames
 * @property {number} beadEvery
 * @property {import("./store.js").Draft | null} draft
 * @property {{ids: Set<number>, paths: Map<number, import("./tracks.js").Path>, counted: Map<number, import("./tracks.js").Path> | null, steps: [Point, Point][]} | null} focus
 * @property {Point | null} focusPoint
 * @property {boolean} focusDoubtful
 * @property {import("./overlay-layout.js").Layout} layout
 * @property {(name: string) => string} keyColour
 */

/** The opacity of a plan's label over a box of this frame. */
const SEE_THROUGH = 0.5;
/** How much of the label or the box (the smaller) their overlap must be for the label to be see-through. */
const COVERED = 0.3;

/**
 * The area two rectangles share.
 * @param {Rect} a
 * @param {Rect} b
 */
function overlap(a, b) {
  const w = Math.min(a.x + a.w, b.x + b.w) - Math.max(a.x, b.x);
  const h = Math.min(a.y + a.h, b.y + b.h) - Math.max(a.y, b.y);
  return w > 0 && h > 0 ? w * h : 0;
}

/** Most crossings marked on the picture at once: the latest ones. */
const MAX_CROSSING_MARKS = 300;

/**
 * Draws the frame; returns every label drawn and where, keyed ("line:0:forward", "track:12"),
 * a track's with its box (`of`).
 * @param {Ctx} ctx
 * @param {Scene} scene
 * @returns {{key: string, rect: Rect, of?: Rect}[]}
 */
export function drawOverlay(ctx, scene) {
  const { plan, px } = scene;
  ctx.clearRect(0, 0, ctx.canvas.width, ctx.canvas.height);
  ctx.lineJoin = "round";
  ctx.lineCap = "round";
  plan.zones.forEach((zone, i) => drawZone(ctx, zone.polygon, scene.keyColour(zone.name), px, scene.selected === `zone:${i}`));
  plan.screenlines.forEach((line, i) => drawGate(ctx, line.points, px, scene.selected === `line:${i}`));
  if (scene.live) drawCrossings(ctx, scene);
  if (scene.tracks) drawTracks(ctx, scene.tracks, scene);
  const pairs = plan.calibration ? plan.calibration.pairs || [] : [];
  pairs.forEach((pair) => drawGroundPoint(ctx, pair.image, px));
  /** @type {Rect[]} */
  const people = [];
  if (scene.tracks) scene.tracks.forEachBox(scene.frame, (_, x, y, w, h) => { people.push({ x, y, w, h }); });
  /** @type {{key: string, rect: Rect, of?: Rect}[]} */
  const drawn = scene.layout.placed.map(({ key, rect, content }) => {
    // A label placed over much of someone at this frame is see-through: they show through it (a
    // corner of a box over it leaves it as it is, easier to read).
    ctx.globalAlpha = people.some((b) => overlap(b, rect) >= COVERED * Math.min(b.w * b.h, rect.w * rect.h)) ? SEE_THROUGH : 1;
    drawTag(ctx, rect, content(scene.frame), px);
    ctx.globalAlpha = 1;
    return { key, rect };
  });
  if (scene.tracks) drawn.push(...trackLabels(ctx, scene.tracks, scene));
  if (scene.draft) drawDraft(ctx, scene.draft, px);
  return drawn;
}

/**
 * A line as a gate: the line, a post across each end, and teeth on its forward side pointing the
 * way a forward crossing goes.
 * @param {Ctx} ctx
 * @param {Point[]} pts
 * @param {number} px
 * @param {boolean} selected
 */
function drawGate(ctx, pts, px, selected) {
  if (pts.length < 2) return;
  tracePath(ctx, pts);
  casedStroke(ctx, PLAN_INK, selected ? 4 : 2.5, px);
  for (const [end, prev] of [[pts[0], pts[1]], [pts[pts.length - 1], pts[pts.length - 2]]]) {
    const len = Math.hypot(end[0] - prev[0], end[1] - prev[1]) || 1;
    const [nx, ny] = [-(end[1] - prev[1]) / len, (end[0] - prev[0]) / len];
    const h = 8 * px;
    tracePath(ctx, [[end[0] - nx * h, end[1] - ny * h], [end[0] + nx * h, end[1] + ny * h]]);
    casedStroke(ctx, PLAN_INK, 3, px);
  }
  for (let j = 0; j + 1 < pts.length; j++) drawTeeth(ctx, pts[j], pts[j + 1], px);
  if (selected) for (const p of pts) handle(ctx, p, px);
}

/**
 * Triangles along the forward side of segment a-b, one every 90 screen pixels.
 * @param {Ctx} ctx
 * @param {Point} a
 * @param {Point} b
 * @param {number} px
 */
function drawTeeth(ctx, a, b, px) {
  const len = Math.hypot(b[0] - a[0], b[1] - a[1]);
  if (len === 0) return;
  const [ux, uy] = [(b[0] - a[0]) / len, (b[1] - a[1]) / len];
  /** @type {Point} */
  const n = [-uy, ux];
  const count = Math.max(1, Math.floor(len / (90 * px)));
  for (let k = 0; k < count; k++) {
    const t = (k + 0.5) / count;
    const at = /** @type {Point} */ ([a[0] + t * (b[0] - a[0]) + n[0] * 7 * px, a[1] + t * (b[1] - a[1]) + n[1] * 7 * px]);
    triangle(ctx, at, n, 8, DIRECTION_COLOUR.forward, px);
  }
}

/**
 * A square handle on a vertex that can be dragged.
 * @param {Ctx} ctx
 * @param {Point} p
 * @param {number} px
 */
function handle(ctx, p, px) {
  const s = 4.5 * px;
  tracePath(ctx, [[p[0] - s, p[1] - s], [p[0] + s, p[1] - s], [p[0] + s, p[1] + s], [p[0] - s, p[1] + s]], true);
  casedStroke(ctx, PLAN_INK, 1.5, px);
}

/**
 * A zone: a light wash and a dashed edge in its key colour.
 * @param {Ctx} ctx
 * @param {Point[]} pts
 * @param {string} colour
 * @param {number} px
 * @param {boolean} selected
 */
function drawZone(ctx, pts, colour, px, selected) {
  if (pts.length < 2) return;
  tracePath(ctx, pts, true);
  ctx.fillStyle = colour + "24";
  ctx.fill();
  casedStroke(ctx, colour, selected ? 3.5 : 2, px, [7, 5]);
  if (selected) for (const p of pts) handle(ctx, p, px);
}

/**
 * A ground point: a cross with a dark casing.
 * @param {Ctx} ctx
 * @param {Point} p
 * @param {number} px
 */
function drawGroundPoint(ctx, [x, y], px) {
  const r = 7 * px;
  tracePath(ctx, [[x - r, y], [x + r, y]]);
  casedStroke(ctx, PLAN_INK, 1.8, px);
  tracePath(ctx, [[x, y - r], [x, y + r]]);
  casedStroke(ctx, PLAN_INK, 1.8, px);
}

/**
 * Every crossing counted so far leaves a triangle where it happened, pointing the way it crossed, in
 * its direction's colour; outlined only where the track was hidden as it crossed.
 * @param {Ctx} ctx
 * @param {Scene} scene
 */
function drawCrossings(ctx, scene) {
  const { plan, px, live } = scene;
  if (!live) return;
  const byName = new Map(plan.screenlines.map((l) => [l.name, l.points]));
  for (const c of live.crossingsUpTo(scene.frame, MAX_CROSSING_MARKS)) {
    const pts = byName.get(c.line);
    const n = pts ? normalNear(pts, [c.x, c.y]) : null;
    if (!n) continue;
    const sign = c.direction === "forward" ? 1 : -1;
    triangle(ctx, [c.x, c.y], [n[0] * sign, n[1] * sign], 9, DIRECTION_COLOUR[c.direction], px, c.inferred);
  }
  const f = scene.focusPoint;
  if (f) {
    ctx.beginPath();
    ctx.arc(f[0], f[1], 13 * px, 0, Math.PI * 2);
    casedStroke(ctx, scene.focusDoubtful ? STATE_COLOUR.doubtful : PLAN_INK, scene.focusDoubtful ? 2 : 1.6, px, [3, 3]);
  }
}

/**
 * The forward normal of the segment of `pts` nearest to p.
 * @param {Point[]} pts
 * @param {Point} p
 * @returns {Point | null}
 */
function normalNear(pts, p) {
  let best = -1;
  let bestD = Infinity;
  for (let j = 0; j + 1 < pts.length; j++) {
    const d = distanceToSegment(p, pts[j], pts[j + 1]);
    if (d < bestD) [best, bestD] = [j, d];
  }
  if (best < 0) return null;
  const side = forwardSide([pts[best], pts[best + 1]]);
  return side ? side.normal : null;
}

/**
 * Each track: its path, its box's corners, its count point; tracks out of focus dimmed.
 * @param {Ctx} ctx
 * @param {import("./tracks.js").TrackView} tracks
 * @param {Scene} scene
 */
function drawTracks(ctx, tracks, scene) {
  const { frame, plan, px, focus, live } = scene;
  /** @param {number} id */
  const dim = (id) => { ctx.globalAlpha = focus && !focus.ids.has(id) ? 0.3 : 1; };
  if (scene.show.paths) {
    for (const [id, path] of tracks.paths(frame - scene.pathFrames + 1, frame, plan.anchor)) {
      if (focus && focus.ids.has(id)) continue;
      dim(id);
      beadedPath(ctx, smoothed(path), px, 1.5, scene.beadEvery);
    }
  }
  ctx.globalAlpha = 1;
  // The track in focus: the path the counting used (averaged), over the count points as measured,
  // so a person sees both the boxes' jitter and what was counted from it.
  if (focus) {
    for (const [id, path] of focus.paths) {
      const counted = focus.counted ? focus.counted.get(id) : undefined;
      if (!counted) {
        beadedPath(ctx, path, px, 1.8, scene.beadEvery);
        continue;
      }
      measuredPoints(ctx, path, px);
      beadedPath(ctx, counted, px, 1.8, scene.beadEvery);
    }
    // A join is an inference, drawn as a predicted stretch is: dashed, in the predicted colour.
    for (const step of focus.steps) beadedPath(ctx, { pts: step, seen: [false, false] }, px, 1.8, scene.beadEvery);
  }
  tracks.forEachBox(frame, (id, x, y, w, h, seen) => {
    dim(id);
    if (scene.show.boxes) boxCorners(ctx, x, y, w, h, px, seen ? STATE_COLOUR.seen : STATE_COLOUR.hidden);
    const counted = live ? live.countedAs(id, frame) : null;
    const focused = Boolean(focus && focus.ids.has(id));
    anchorMark(ctx, countPoint(x, y, w, h, plan.anchor), px, { seen, counted: counted ? DIRECTION_COLOUR[counted] : null, focused });
  });
  ctx.globalAlpha = 1;
}

/**
 * Where a track's boxes put its count point in the frames it was seen: a small dot each, faint,
 * under its counted path (predicted points are not measurements and get none).
 * @param {Ctx} ctx
 * @param {import("./tracks.js").Path} path
 * @param {number} px
 */
function measuredPoints(ctx, { pts, seen }, px) {
  const alpha = ctx.globalAlpha;
  ctx.globalAlpha = alpha * 0.75;
  for (const [colour, radius] of /** @type {const} */ ([[CASING, 1.9], [STATE_COLOUR.seen, 1.1]])) {
    ctx.fillStyle = colour;
    ctx.beginPath();
    for (let i = 0; i < pts.length; i++) {
      if (!seen[i]) continue;
      ctx.moveTo(pts[i][0] + radius * px, pts[i][1]);
      ctx.arc(pts[i][0], pts[i][1], radius * px, 0, Math.PI * 2);
    }
    ctx.fill();
  }
  ctx.globalAlpha = alpha;
}

/**
 * A path with each point the mean of it and its two neighbours on each side (a fifth of a second at
 * 25 fps), so the paths of the tracks not in focus read as movements, not as the boxes' jitter.
 * @param {import("./tracks.js").Path} path
 * @returns {import("./tracks.js").Path}
 */
function smoothed({ pts, seen }) {
  const n = pts.length;
  const out = pts.map((_, i) => {
    const from = Math.max(0, i - 2);
    const to = Math.min(n - 1, i + 2);
    let x = 0;
    let y = 0;
    for (let k = from; k <= to; k++) [x, y] = [x + pts[k][0], y + pts[k][1]];
    return /** @type {Point} */ ([x / (to - from + 1), y / (to - from + 1)]);
  });
  // The last point stays where the count point is now.
  if (n) out[n - 1] = pts[n - 1];
  return { pts: out, seen };
}

/**
 * Labels of this frame's tracks, after the fixed ones: the tracks in focus ("track 12 ·
 * pedestrian"), then every track's number when asked for; a label with no room left is not drawn.
 * @param {Ctx} ctx
 * @param {import("./tracks.js").TrackView} tracks
 * @param {Scene} scene
 */
function trackLabels(ctx, tracks, scene) {
  const { frame, px, focus } = scene;
  const board = scene.layout.board;
  const kept = board.taken.length;
  /** @type {{key: string, rect: Rect, of?: Rect}[]} */
  const drawn = [];
  /** @type {{id: number, x: number, y: number, w: number, h: number, focused: boolean}[]} */
  const boxes = [];
  tracks.forEachBox(frame, (id, x, y, w, h) => boxes.push({ id, x, y, w, h, focused: Boolean(focus && focus.ids.has(id)) }));
  boxes.sort((a, b) => Number(b.focused) - Number(a.focused));
  for (const b of boxes) {
    if (!b.focused && !scene.show.numbers) continue;
    const cls = tracks.classes.get(b.id);
    const tag = b.focused ? { text: `track ${b.id}${cls ? ` · ${cls}` : ""}`, colour: "#FFFFFF" } : { text: String(b.id), colour: "#E4E4E4" };
    const { w, h } = tagSize(ctx, tag, px);
    const g = 4 * px;
    // Beside its own box only, and rather not over another's: in a crowd a number drawn further
    // off, or over the next person, seemed to name them (a newcomer's trial). The tracks in focus
    // may go further when there is no room beside.
    const others = boxes.filter((o) => o !== b);
    /** @type {import("./geometry.js").Point[]} */
    const at = [[b.x, b.y - h - g], [b.x + b.w + g, b.y], [b.x - w - g, b.y], [b.x, b.y + b.h + g]];
    const rect = board.place({ w, h, at, near: !b.focused, avoid: others });
    if (!rect) continue;
    drawTag(ctx, rect, tag, px);
    drawn.push({ key: `track:${b.id}`, rect, of: { x: b.x, y: b.y, w: b.w, h: b.h } });
  }
  board.taken.length = kept; // the next frame places them afresh
  return drawn;
}

/**
 * @param {Ctx} ctx
 * @param {import("./store.js").Draft} draft
 * @param {number} px
 */
function drawDraft(ctx, draft, px) {
  const pts = draft.cursor ? [...draft.points, draft.cursor] : draft.points;
  if (!pts.length) return;
  tracePath(ctx, pts, draft.kind === "zone" && pts.length > 2);
  casedStroke(ctx, PLAN_INK, 2, px, [6, 4]);
  for (const p of draft.points) handle(ctx, p, px);
}
