// @ts-check
// The marks drawn over the footage, one function each (their meaning: DEVELOPERS.md, "Visual
// language"). Every mark is drawn over a dark casing so it reads on light and dark footage alike.
// Coordinates are video pixels; sizes are given in screen pixels and multiplied by `px` (video
// pixels per screen pixel), so marks keep their size however large the picture is shown.

import { CASING, STATE_COLOUR, TAG_GROUND } from "./palette.js";

/** @typedef {CanvasRenderingContext2D} Ctx */
/** @typedef {import("./geometry.js").Point} Point */
/** @typedef {import("./labels.js").Rect} Rect */
/**
 * A label's content: text, an optional number after it (bold), an optional triangle before it
 * pointing along (dx, dy), an optional key-colour stripe on its left edge, and an optional key
 * (a hand count's key for this line and direction) first, drawn as a light keycap.
 * @typedef {{text: string, count?: string, glyph?: {colour: string, dx: number, dy: number}, stripe?: string, colour?: string, keycap?: string}} TagContent
 */

/** Label sizes, screen pixels. */
export const TAG = { height: 18, pad: 5, glyph: 9, font: 12 };

/**
 * Builds a path through `pts`.
 * @param {Ctx} ctx
 * @param {Point[]} pts
 * @param {boolean} [closed]
 */
export function tracePath(ctx, pts, closed = false) {
  ctx.beginPath();
  pts.forEach((p, j) => (j ? ctx.lineTo(p[0], p[1]) : ctx.moveTo(p[0], p[1])));
  if (closed) ctx.closePath();
}

/**
 * Strokes the current path twice: the casing, then the colour.
 * @param {Ctx} ctx
 * @param {string} colour
 * @param {number} width screen pixels
 * @param {number} px
 * @param {number[]} [dash] screen pixels
 */
export function casedStroke(ctx, colour, width, px, dash = []) {
  ctx.setLineDash(dash.map((d) => d * px));
  ctx.strokeStyle = CASING;
  ctx.lineWidth = (width + 2.5) * px;
  ctx.stroke();
  ctx.strokeStyle = colour;
  ctx.lineWidth = width * px;
  ctx.stroke();
  ctx.setLineDash([]);
}

/**
 * A triangle centred on (x, y), pointing along the unit vector (dx, dy).
 * @param {Ctx} ctx
 * @param {number} x
 * @param {number} y
 * @param {number} dx
 * @param {number} dy
 * @param {number} size the triangle's length, video pixels
 */
export function trianglePath(ctx, x, y, dx, dy, size) {
  const h = size / 2;
  ctx.beginPath();
  ctx.moveTo(x + dx * h, y + dy * h);
  ctx.lineTo(x - dx * h - dy * h * 0.9, y - dy * h + dx * h * 0.9);
  ctx.lineTo(x - dx * h + dy * h * 0.9, y - dy * h - dx * h * 0.9);
  ctx.closePath();
}

/**
 * A filled (or, `hollow`, outlined) triangle with a casing.
 * @param {Ctx} ctx
 * @param {Point} at
 * @param {Point} dir unit vector the triangle points along
 * @param {number} size screen pixels
 * @param {string} colour
 * @param {number} px
 * @param {boolean} [hollow]
 */
export function triangle(ctx, at, dir, size, colour, px, hollow = false) {
  trianglePath(ctx, at[0], at[1], dir[0], dir[1], size * px);
  ctx.lineJoin = "round";
  ctx.strokeStyle = CASING;
  ctx.lineWidth = (hollow ? 4 : 2.5) * px;
  ctx.stroke();
  if (hollow) {
    ctx.strokeStyle = colour;
    ctx.lineWidth = 1.8 * px;
    ctx.stroke();
  } else {
    ctx.fillStyle = colour;
    ctx.fill();
  }
}

/**
 * The count point of a track: a disc where it was seen, a ring where it was only predicted; a
 * collar in the direction's colour once it has been counted; larger when it is the one in focus.
 * @param {Ctx} ctx
 * @param {Point} p
 * @param {number} px
 * @param {{seen: boolean, counted: string | null, focused: boolean}} state `counted`: the colour of its last crossing's direction
 */
export function anchorMark(ctx, p, px, { seen, counted, focused }) {
  const r = (focused ? 5.5 : 4) * px;
  const disc = (/** @type {number} */ radius) => {
    ctx.beginPath();
    ctx.arc(p[0], p[1], radius, 0, Math.PI * 2);
  };
  if (counted) {
    disc(r + 3.2 * px);
    ctx.fillStyle = CASING;
    ctx.fill();
    disc(r + 2.2 * px);
    ctx.fillStyle = counted;
    ctx.fill();
  }
  disc(r + 1.4 * px);
  ctx.fillStyle = CASING;
  ctx.fill();
  disc(seen ? r : r - 0.6 * px);
  if (seen) {
    ctx.fillStyle = STATE_COLOUR.seen;
    ctx.fill();
  } else {
    ctx.strokeStyle = STATE_COLOUR.hidden;
    ctx.lineWidth = 2 * px;
    ctx.stroke();
  }
}

/**
 * A box shown by its four corners only, so the object inside stays in view.
 * @param {Ctx} ctx
 * @param {number} x
 * @param {number} y
 * @param {number} w
 * @param {number} h
 * @param {number} px
 * @param {string} colour
 */
export function boxCorners(ctx, x, y, w, h, px, colour) {
  const arm = Math.min(7 * px, w / 3, h / 3);
  ctx.beginPath();
  for (const [cx, cy, sx, sy] of [[x, y, 1, 1], [x + w, y, -1, 1], [x, y + h, 1, -1], [x + w, y + h, -1, -1]]) {
    ctx.moveTo(cx + sx * arm, cy);
    ctx.lineTo(cx, cy);
    ctx.lineTo(cx, cy + sy * arm);
  }
  casedStroke(ctx, colour, 1.4, px);
}

/**
 * A track's path: its count points joined, dashed where they were only predicted, with a bead every
 * `every` points (half a second), so its speed shows in the beads' spacing.
 * @param {Ctx} ctx
 * @param {import("./tracks.js").Path} path
 * @param {number} px
 * @param {number} width screen pixels
 * @param {number} every
 */
export function beadedPath(ctx, path, px, width, every) {
  const { pts, seen } = path;
  if (pts.length < 2) return;
  // Runs of seen and of predicted points, each run joined to the next one's first point.
  let start = 0;
  for (let i = 1; i <= pts.length; i++) {
    if (i < pts.length && seen[i] === seen[start]) continue;
    const run = pts.slice(start, Math.min(i + 1, pts.length));
    if (run.length > 1) {
      tracePath(ctx, run);
      casedStroke(ctx, seen[start] ? STATE_COLOUR.seen : STATE_COLOUR.hidden, width, px, seen[start] ? [] : [4, 3]);
    }
    start = i;
  }
  for (let i = pts.length - 1 - every; i >= 0; i -= every) {
    ctx.beginPath();
    ctx.arc(pts[i][0], pts[i][1], (width + 0.8) * px, 0, Math.PI * 2);
    ctx.fillStyle = CASING;
    ctx.fill();
    ctx.beginPath();
    ctx.arc(pts[i][0], pts[i][1], (width * 0.6) * px, 0, Math.PI * 2);
    ctx.fillStyle = seen[i] ? STATE_COLOUR.seen : STATE_COLOUR.hidden;
    ctx.fill();
  }
}

/**
 * The font of labels, at this scale.
 * @param {number} px
 * @param {boolean} [bold]
 */
function font(px, bold = false) {
  return `${bold ? "700 " : ""}${Math.round(TAG.font * px)}px system-ui, -apple-system, "Segoe UI", Roboto, sans-serif`;
}

/**
 * The size a label needs, video pixels.
 * @param {Ctx} ctx
 * @param {TagContent} tag
 * @param {number} px
 */
export function tagSize(ctx, tag, px) {
  ctx.font = font(px);
  let w = TAG.pad * 2 * px + ctx.measureText(tag.text).width;
  if (tag.keycap) w += keycapWidth(ctx, tag.keycap, px) + 4 * px;
  if (tag.glyph) w += (TAG.glyph + 4) * px;
  if (tag.stripe) w += 3 * px;
  if (tag.count !== undefined) {
    ctx.font = font(px, true);
    w += 5 * px + ctx.measureText(tag.count).width;
  }
  return { w: Math.ceil(w), h: Math.ceil(TAG.height * px) };
}

/**
 * A label: a dark rounded ground, then its stripe, triangle, text and number, left to right.
 * @param {Ctx} ctx
 * @param {Rect} r
 * @param {TagContent} tag
 * @param {number} px
 */
export function drawTag(ctx, r, tag, px) {
  ctx.fillStyle = TAG_GROUND;
  ctx.beginPath();
  ctx.roundRect(r.x, r.y, r.w, r.h, 3 * px);
  ctx.fill();
  let x = r.x + TAG.pad * px;
  const mid = r.y + r.h / 2;
  if (tag.stripe) {
    ctx.fillStyle = tag.stripe;
    ctx.fillRect(r.x, r.y, 3 * px, r.h);
    x += 3 * px;
  }
  if (tag.keycap) x += drawKeycap(ctx, tag.keycap, x, mid, px) + 4 * px;
  if (tag.glyph) {
    trianglePath(ctx, x + (TAG.glyph / 2) * px, mid, tag.glyph.dx, tag.glyph.dy, TAG.glyph * px);
    ctx.fillStyle = tag.glyph.colour;
    ctx.fill();
    x += (TAG.glyph + 4) * px;
  }
  ctx.textBaseline = "middle";
  ctx.font = font(px);
  ctx.fillStyle = tag.colour || "#F2F2F2";
  ctx.fillText(tag.text, x, mid + 0.5 * px, r.w);
  if (tag.count !== undefined) {
    x += ctx.measureText(tag.text).width + 5 * px;
    ctx.font = font(px, true);
    ctx.fillStyle = "#FFFFFF";
    ctx.fillText(tag.count, x, mid + 0.5 * px);
  }
}

/**
 * The width of a keycap, video pixels.
 * @param {Ctx} ctx
 * @param {string} key
 * @param {number} px
 */
function keycapWidth(ctx, key, px) {
  ctx.font = font(px, true);
  return Math.max(14 * px, ctx.measureText(key).width + 6 * px);
}

/**
 * A key as a light keycap with its letter in dark, its left edge at x; returns its width.
 * @param {Ctx} ctx
 * @param {string} key
 * @param {number} x
 * @param {number} mid the label's middle, y
 * @param {number} px
 */
function drawKeycap(ctx, key, x, mid, px) {
  const w = keycapWidth(ctx, key, px);
  const h = 14 * px;
  ctx.textBaseline = "middle";
  ctx.fillStyle = "#F2F2F2";
  ctx.beginPath();
  ctx.roundRect(x, mid - h / 2, w, h, 2.5 * px);
  ctx.fill();
  ctx.fillStyle = "#10131A";
  ctx.textAlign = "center";
  ctx.fillText(key, x + w / 2, mid + 0.5 * px);
  ctx.textAlign = "start";
  return w;
}
