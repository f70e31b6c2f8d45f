// @ts-check
// Placing labels over the picture so that none covers another and none runs off the picture's edge.
// Each label asks for a few places, best first; the board takes the first free one that covers the
// least of the picture's action (where tracks go), clamped inside the picture, and searches outward
// from the best place when all of them are taken. A label with no free place left is not drawn.

/** @typedef {import("./geometry.js").Point} Point */
/** @typedef {{x: number, y: number, w: number, h: number}} Rect in video pixels, top-left + size */
/**
 * A label to place: its size and the top-left corners it may take, best first; `near`: only
 * those (a track's number away from its box would seem to name another); `avoid`: things a
 * place should rather not cover (other tracks' boxes), weighed as the picture's action is.
 * @typedef {{w: number, h: number, at: Point[], near?: boolean, avoid?: Rect[]}} LabelRequest
 */

/** Rings searched around the best place when every asked-for place is taken. */
const RINGS = 14;
/** Directions tried on each ring. */
const DIRECTIONS = 16;

export class LabelBoard {
  /**
   * @param {number} width the picture's size, video pixels
   * @param {number} height
   * @param {number} gap the least space between two labels, video pixels
   * @param {((r: Rect) => number) | null} [cost] how much of the picture's action `r` covers, 0 to 1
   */
  constructor(width, height, gap, cost = null) {
    this.width = width;
    this.height = height;
    this.gap = gap;
    this.cost = cost;
    /** @type {Rect[]} labels placed so far */
    this.taken = [];
  }

  /**
   * `r` moved inside the picture (a label wider than the picture starts at its left edge).
   * @param {Rect} r
   * @returns {Rect}
   */
  clamp(r) {
    const x = Math.max(0, Math.min(this.width - r.w, r.x));
    const y = Math.max(0, Math.min(this.height - r.h, r.y));
    return { x, y, w: r.w, h: r.h };
  }

  /** @param {Rect} r */
  free(r) {
    const g = this.gap;
    return this.taken.every((t) => r.x + r.w + g <= t.x || t.x + t.w + g <= r.x || r.y + r.h + g <= t.y || t.y + t.h + g <= r.y);
  }

  /**
   * Marks `r` as taken without searching (a mark that labels must keep clear of).
   * @param {Rect} r
   */
  block(r) {
    this.taken.push(r);
  }

  /**
   * Places a label; returns where it went, or null when there is no room left for it.
   * @param {LabelRequest} req
   * @returns {Rect | null}
   */
  place(req) {
    const best = this.bestOf(req.at.map(([x, y]) => this.clamp({ x, y, w: req.w, h: req.h })), req.avoid);
    const found = best || (req.near ? null : this.search(req));
    if (found) this.taken.push(found);
    return found;
  }

  /**
   * The free place among `places` with the lowest score: its rank among the asked-for places plus
   * how much action it covers and how much of it lies over a thing to avoid (either costs more
   * than a place further down the list).
   * @param {Rect[]} places
   * @param {Rect[]} [avoid]
   * @returns {Rect | null}
   */
  bestOf(places, avoid = []) {
    /** @type {Rect | null} */
    let best = null;
    let bestScore = Infinity;
    places.forEach((r, rank) => {
      if (!this.free(r)) return;
      const score = rank + (this.cost ? 12 * this.cost(r) : 0) + 12 * coveredShare(r, avoid);
      if (score < bestScore) {
        best = r;
        bestScore = score;
      }
    });
    return best;
  }

  /**
   * Rings of places round the first asked-for place, nearest first.
   * @param {LabelRequest} req
   */
  search(req) {
    if (!req.at.length) return null;
    const [x0, y0] = req.at[0];
    const step = Math.max(req.h, 4);
    for (let ring = 1; ring <= RINGS; ring++) {
      /** @type {Rect[]} */
      const places = [];
      for (let k = 0; k < DIRECTIONS; k++) {
        const a = (2 * Math.PI * k) / DIRECTIONS;
        places.push(this.clamp({ x: x0 + Math.cos(a) * ring * step * 1.6, y: y0 + Math.sin(a) * ring * step, w: req.w, h: req.h }));
      }
      const best = this.bestOf(places);
      if (best) return best;
    }
    return null;
  }
}

/**
 * The largest share of `r` that any one of `things` covers, 0 to 1.
 * @param {Rect} r
 * @param {Rect[]} things
 */
function coveredShare(r, things) {
  let most = 0;
  for (const t of things) {
    const w = Math.min(r.x + r.w, t.x + t.w) - Math.max(r.x, t.x);
    const h = Math.min(r.y + r.h, t.y + t.h) - Math.max(r.y, t.y);
    if (w > 0 && h > 0) most = Math.max(most, (w * h) / (r.w * r.h));
  }
  return most;
}
