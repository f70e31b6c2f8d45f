// @ts-check
// Small picture-space helpers shared by drawing and editing. Points are [x, y] in video pixels,
// y pointing down, like the plan file.

/** @typedef {[number, number]} Point [x, y] in video pixels, x to the right, y down */

/**
 * @param {Point} a
 * @param {Point} b
 */
export function distance(a, b) {
  return Math.hypot(a[0] - b[0], a[1] - b[1]);
}

/**
 * Distance from p to the segment a-b.
 * @param {Point} p
 * @param {Point} a
 * @param {Point} b
 */
export function distanceToSegment(p, a, b) {
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const len2 = dx * dx + dy * dy;
  const t = len2 === 0 ? 0 : Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2));
  return distance(p, [a[0] + t * dx, a[1] + t * dy]);
}

/**
 * A polyline's longest segment and the unit normal pointing to the side a `forward` crossing moves
 * into: from the left of p0->p1 to its right as seen on screen with y down, i.e. towards (-dy, dx).
 * @param {Point[]} points
 * @returns {{normal: Point, segment: [Point, Point]} | null}
 */
export function forwardSide(points) {
  /** @type {{a: Point, b: Point, len: number} | null} */
  let best = null;
  for (let i = 0; i + 1 < points.length; i++) {
    const [a, b] = [points[i], points[i + 1]];
    const len = distance(a, b);
    if (!best || len > best.len) best = { a, b, len };
  }
  if (!best || best.len === 0) return null;
  const dx = (best.b[0] - best.a[0]) / best.len;
  const dy = (best.b[1] - best.a[1]) / best.len;
  return { normal: [-dy, dx], segment: [best.a, best.b] };
}

/** @param {Point[]} points @returns {Point} */
export function centroid(points) {
  const n = points.length || 1;
  return [points.reduce((s, p) => s + p[0], 0) / n, points.reduce((s, p) => s + p[1], 0) / n];
}

/**
 * Index of the first element of a sorted array greater than x.
 * @param {ArrayLike<number>} sorted
 * @param {number} x
 */
export function upperBound(sorted, x) {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid] <= x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
