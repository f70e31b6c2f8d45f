// @ts-check
// Draws over the video: the plan (lines with their forward arrow and running counts, zones, ground
// points), then the tracks (boxes, identities, trails), then whatever is being drawn right now.
// Everything is in video pixels; `px` converts a length on screen to video pixels so strokes and text
// keep their size however large the picture is shown.

import { forwardArrow, centroid, planColour, trackColour } from "./geometry.js";

/** @typedef {import("./geometry.js").Point} Point */
/** @typedef {CanvasRenderingContext2D} Ctx */

/**
 * What to draw for one frame. `px`: video pixels per screen pixel; `trailFrames`: how many frames of
 * each track's path to show.
 * @typedef {object} Scene
 * @property {import("./plan.js").Plan} plan
 * @property {number} frame
 * @property {number} px
 * @property {string | null} selected
 * @property {import("./tracks.js").LiveCounts | null} live
 * @property {import("./tracks.js").TrackView | null} tracks
 * @property {boolean} showTrails
 * @property {boolean} showBoxes
 * @property {number} trailFrames
 * @property {import("./store.js").Draft | null} draft
 */

/**
 * @param {Ctx} ctx
 * @param {Scene} state
 */
export function drawOverlay(ctx, state) {
  const { plan, frame, px } = state;
  ctx.clearRect(0, 0, ctx.canvas.width, ctx.canvas.height);
  ctx.lineJoin = "round";
  ctx.lineCap = "round";
  ctx.font = `${Math.round(13 * px)}px system-ui, sans-serif`;

  plan.zones.forEach((zone, i) => drawZone(ctx, zone, planColour(plan.screenlines.length + i), px, state.selected === `zone:${i}`));
  plan.screenlines.forEach((line, i) => {
    const counts = state.live ? state.live.at(line.name, frame) : null;
    drawLine(ctx, line, planColour(i), px, state.selected === `line:${i}`, counts);
  });
  const pairs = plan.calibration ? plan.calibration.pairs || [] : [];
  pairs.forEach((pair, i) => drawGroundPoint(ctx, pair, i, px));

  if (state.tracks) drawTracks(ctx, state.tracks, state, px);
  if (state.draft) drawDraft(ctx, state.draft, px);
}

/**
 * Text on a dark box, so it reads on any picture.
 * @param {Ctx} ctx
 * @param {string} text
 * @param {number} x
 * @param {number} y
 * @param {number} px
 * @param {string} colour
 */
function label(ctx, text, x, y, px, colour) {
  const pad = 3 * px;
  const w = ctx.measureText(text).width;
  const h = 15 * px;
  ctx.fillStyle = "rgba(14, 17, 24, 0.78)";
  ctx.fillRect(x - pad, y - h + pad, w + 2 * pad, h + pad);
  ctx.fillStyle = colour;
  ctx.fillText(text, x, y);
}

/**
 * @param {Ctx} ctx
 * @param {import("./plan.js").Screenline} line
 * @param {string} colour
 * @param {number} px
 * @param {boolean} selected
 * @param {import("./tracks.js").LineCounts | null} counts running totals at this frame, once counted
 */
function drawLine(ctx, line, colour, px, selected, counts) {
  const pts = line.points;
  if (pts.length < 2) return;
  ctx.strokeStyle = "rgba(0,0,0,0.6)";
  ctx.lineWidth = (selected ? 7 : 5) * px;
  ctx.beginPath();
  pts.forEach((p, j) => (j ? ctx.lineTo(p[0], p[1]) : ctx.moveTo(p[0], p[1])));
  ctx.stroke();
  ctx.strokeStyle = colour;
  ctx.lineWidth = (selected ? 4 : 2.5) * px;
  ctx.stroke();
  for (const p of pts) {
    ctx.fillStyle = colour;
    ctx.beginPath();
    ctx.arc(p[0], p[1], (selected ? 6 : 4) * px, 0, Math.PI * 2);
    ctx.fill();
  }
  const arrow = forwardArrow(pts);
  if (!arrow) return;
  const [mx, my] = arrow.mid;
  const [nx, ny] = arrow.normal;
  const len = 26 * px;
  const tip = [mx + nx * len, my + ny * len];
  ctx.strokeStyle = colour;
  ctx.lineWidth = 3 * px;
  ctx.beginPath();
  ctx.moveTo(mx, my);
  ctx.lineTo(tip[0], tip[1]);
  ctx.stroke();
  // Arrow head: two strokes back from the tip, at right angles to each other.
  const back = 9 * px;
  ctx.beginPath();
  ctx.moveTo(tip[0] - nx * back - ny * back, tip[1] - ny * back + nx * back);
  ctx.lineTo(tip[0], tip[1]);
  ctx.lineTo(tip[0] - nx * back + ny * back, tip[1] - ny * back - nx * back);
  ctx.stroke();
  const fwd = line.forward || "forward";
  const bwd = line.backward || "backward";
  const fText = counts ? `${fwd} ${counts.forward}` : fwd;
  const bText = counts ? `${bwd} ${counts.backward}` : bwd;
  label(ctx, line.name, pts[0][0] + 6 * px, pts[0][1] - 8 * px, px, colour);
  // The forward label sits at the arrow's tip, the backward one on the other side of the line.
  label(ctx, fText, tip[0] + 4 * px, tip[1] + 14 * px * Math.max(0, ny), px, colour);
  label(ctx, bText, mx - nx * len + 4 * px, my - ny * len + 14 * px * Math.max(0, -ny), px, "#d8dbe4");
}

/**
 * @param {Ctx} ctx
 * @param {import("./plan.js").Zone} zone
 * @param {string} colour
 * @param {number} px
 * @param {boolean} selected
 */
function drawZone(ctx, zone, colour, px, selected) {
  const pts = zone.polygon;
  if (pts.length < 2) return;
  ctx.beginPath();
  pts.forEach((p, j) => (j ? ctx.lineTo(p[0], p[1]) : ctx.moveTo(p[0], p[1])));
  ctx.closePath();
  ctx.fillStyle = colour + "2e";
  ctx.fill();
  ctx.setLineDash([8 * px, 5 * px]);
  ctx.strokeStyle = colour;
  ctx.lineWidth = (selected ? 4 : 2) * px;
  ctx.stroke();
  ctx.setLineDash([]);
  for (const p of pts) {
    ctx.fillStyle = colour;
    ctx.fillRect(p[0] - 4 * px, p[1] - 4 * px, 8 * px, 8 * px);
  }
  const c = centroid(pts);
  label(ctx, zone.name, c[0], c[1], px, colour);
}

/**
 * @param {Ctx} ctx
 * @param {import("./plan.js").GroundPair} pair
 * @param {number} i
 * @param {number} px
 */
function drawGroundPoint(ctx, pair, i, px) {
  const [x, y] = pair.image;
  const r = 7 * px;
  ctx.strokeStyle = "#ffffff";
  ctx.lineWidth = 2 * px;
  ctx.beginPath();
  ctx.moveTo(x - r, y);
  ctx.lineTo(x + r, y);
  ctx.moveTo(x, y - r);
  ctx.lineTo(x, y + r);
  ctx.stroke();
  const g = pair.ground && pair.ground.every((v) => typeof v === "number") ? ` (${pair.ground[0]}, ${pair.ground[1]})` : " (?)";
  label(ctx, `G${i + 1}${g}`, x + r, y - r, px, "#ffffff");
}

/**
 * @param {Ctx} ctx
 * @param {import("./tracks.js").TrackView} tracks
 * @param {Scene} state
 * @param {number} px
 */
function drawTracks(ctx, tracks, state, px) {
  const { frame, plan } = state;
  if (state.showTrails) {
    const trails = tracks.trails(frame, state.trailFrames, plan.anchor);
    ctx.lineWidth = 2 * px;
    for (const [id, pts] of trails) {
      if (pts.length < 2) continue;
      ctx.strokeStyle = trackColour(id, 0.75);
      ctx.beginPath();
      pts.forEach((p, j) => (j ? ctx.lineTo(p[0], p[1]) : ctx.moveTo(p[0], p[1])));
      ctx.stroke();
    }
  }
  tracks.forEachBox(frame, (id, x, y, w, h, observed) => {
    const colour = trackColour(id);
    if (state.showBoxes) {
      ctx.strokeStyle = colour;
      ctx.lineWidth = 2 * px;
      // A box the tracker only predicted (no detection this frame) is dashed.
      ctx.setLineDash(observed ? [] : [5 * px, 4 * px]);
      ctx.strokeRect(x, y, w, h);
      ctx.setLineDash([]);
    }
    const cls = tracks.classes.get(id);
    label(ctx, cls ? `${id} ${cls}` : `${id}`, x, y - 3 * px, px, colour);
  });
}

/**
 * @param {Ctx} ctx
 * @param {import("./store.js").Draft} draft
 * @param {number} px
 */
function drawDraft(ctx, draft, px) {
  const pts = draft.cursor ? [...draft.points, draft.cursor] : draft.points;
  if (!pts.length) return;
  ctx.strokeStyle = "#ffffff";
  ctx.lineWidth = 2 * px;
  ctx.setLineDash([6 * px, 4 * px]);
  ctx.beginPath();
  pts.forEach((p, j) => (j ? ctx.lineTo(p[0], p[1]) : ctx.moveTo(p[0], p[1])));
  if (draft.kind === "zone" && pts.length > 2) ctx.closePath();
  ctx.stroke();
  ctx.setLineDash([]);
  for (const p of draft.points) {
    ctx.fillStyle = "#ffffff";
    ctx.beginPath();
    ctx.arc(p[0], p[1], 4 * px, 0, Math.PI * 2);
    ctx.fill();
  }
}
