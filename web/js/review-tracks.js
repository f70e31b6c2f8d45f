// @ts-check
// The review's list of tracks, as the tracker made them (before pieces of one path are joined for
// counting), with filters that lead to the tracks worth a look: by class, by length (very short
// tracks are often noise), by whether they crossed a line, and by whether they start or end in the
// middle of the picture (where people do not usually appear or vanish: a track may have broken
// there). Choosing one shows its first frame with its whole path standing out.

import { el, byId, clockText, revealInList } from "./dom.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./protocol.js").TrackInfo} TrackInfo */
/** What the list knows of a track beyond the tracker's summary. @typedef {TrackInfo & {seconds: number, lines: Set<string>, startsMid: boolean, endsMid: boolean}} TrackFacts */

const MAX_TRACKS_SHOWN = 600;
/** A box closer than this share of the picture's width or height to its edge is "at the edge". */
const EDGE_SHARE = 0.03;

export class TrackList {
  /**
   * @param {PageStore} store
   * @param {(track: TrackInfo) => void} choose show this track
   */
  constructor(store, choose) {
    this.store = store;
    this.choose = choose;
    this.list = byId("track-list", HTMLElement);
    this.shown = byId("tracks-shown", HTMLElement);
    this.badge = byId("tracks-count", HTMLElement);
    this.filters = {
      cls: byId("filter-class", HTMLSelectElement),
      length: byId("filter-length", HTMLSelectElement),
      crossed: byId("filter-crossed", HTMLSelectElement),
      ends: byId("filter-ends", HTMLSelectElement),
    };
    /** @type {TrackFacts[]} */
    this.facts = [];
    /** @type {Map<number, HTMLButtonElement>} */
    this.buttons = new Map();
    for (const f of Object.values(this.filters)) f.addEventListener("change", () => this.show());
    store.subscribe(["tracks", "results"], () => {
      this.facts = trackFacts(store);
      this.offerChoices();
      this.show();
    });
    store.subscribe(["focus"], () => this.mark());
  }

  /** The class and line filters offer what these tracks and this plan have; a choice still offered is kept. */
  offerChoices() {
    const { cls, crossed } = this.filters;
    const classes = [...new Set(this.facts.map((t) => t.class || "unclassified"))].sort();
    refill(cls, [["", "all"], ...classes.map((c) => [c, c])]);
    const lines = this.store.results ? this.store.results.report.screenlines.map((l) => l.name) : [];
    refill(crossed, [["", "any line or none"], ["*", "a line"], ["-", "no line"], ...lines.map((n) => [`line:${n}`, n])]);
  }

  show() {
    const shown = this.facts.filter(this.matcher());
    this.buttons = new Map();
    const rows = shown.slice(0, MAX_TRACKS_SHOWN).map((t) => {
      const b = el("button", { type: "button", onclick: () => this.choose(t) }, trackRow(t, this.store.fps));
      this.buttons.set(t.id, b);
      return el("li", {}, b);
    });
    if (shown.length > MAX_TRACKS_SHOWN) rows.push(el("li", { class: "more", text: `… and ${shown.length - MAX_TRACKS_SHOWN} more: narrow the list with the filters.` }));
    this.list.replaceChildren(...rows);
    this.badge.textContent = this.facts.length ? `${this.facts.length}` : "";
    this.shown.textContent = this.facts.length ? `${shown.length} of ${this.facts.length} tracks. Choose one to see it from its first frame, its whole path drawn.` : "";
    this.mark();
  }

  /** The test the filters ask for. */
  matcher() {
    const { cls, length, crossed, ends } = this.filters;
    /** @param {TrackFacts} t */
    return (t) => {
      if (cls.value && (t.class || "unclassified") !== cls.value) return false;
      if (length.value === "short" && t.seconds >= 1) return false;
      if (length.value === "under3" && t.seconds >= 3) return false;
      if (length.value === "long" && t.seconds < 3) return false;
      if (crossed.value === "*" && !t.lines.size) return false;
      if (crossed.value === "-" && t.lines.size) return false;
      if (crossed.value.startsWith("line:") && !t.lines.has(crossed.value.slice(5))) return false;
      if (ends.value === "start" && !t.startsMid) return false;
      if (ends.value === "end" && !t.endsMid) return false;
      if (ends.value === "either" && !t.startsMid && !t.endsMid) return false;
      return true;
    };
  }

  /** The chosen track's row is marked as the current one. */
  mark() {
    const focus = this.store.focus;
    const ids = new Set(focus && !focus.event ? focus.tracks : []);
    for (const [id, b] of this.buttons) b.setAttribute("aria-current", String(ids.has(id)));
    const first = focus && !focus.event ? this.buttons.get(focus.tracks[0]) : undefined;
    if (first) revealInList(this.list, first);
  }
}

/**
 * Replaces a select's options, keeping the chosen value where it is still offered.
 * @param {HTMLSelectElement} select
 * @param {string[][]} options [value, text]
 */
function refill(select, options) {
  const kept = select.value;
  select.replaceChildren(...options.map(([value, text]) => el("option", { value, text })));
  select.value = options.some(([v]) => v === kept) ? kept : "";
}

/**
 * Each track with its length, the lines it crossed (from the report's events) and whether it starts
 * or ends away from the picture's edge (from its first and last box).
 * @param {PageStore} store
 * @returns {TrackFacts[]}
 */
function trackFacts(store) {
  const tracks = store.tracks;
  if (!tracks) return [];
  /** @type {Map<number, Set<string>>} */
  const crossed = new Map();
  for (const e of store.results ? store.results.report.events : []) {
    if (e.kind !== "screenline") continue;
    for (const id of e.track_ids && e.track_ids.length ? e.track_ids : [e.track]) crossed.set(id, (crossed.get(id) || new Set()).add(e.name));
  }
  const picture = store.picture || { width: Infinity, height: Infinity };
  const mx = picture.width * EDGE_SHARE;
  const my = picture.height * EDGE_SHARE;
  /** @param {number[]} b */
  const inside = ([x, y, w, h]) => x > mx && y > my && x + w < picture.width - mx && y + h < picture.height - my;
  const ends = tracks.ends();
  const last = store.lastFrame;
  // The tracker confirms a track some frames after it first sees it: a track confirmed within the
  // first second was there from the start, one lost within the last second was there to the end.
  const second = Math.round(store.fps);
  return tracks.list.map((t) => {
    const end = ends.get(t.id);
    return {
      ...t,
      seconds: (t.last_frame - t.first_frame + 1) / store.fps,
      lines: crossed.get(t.id) || new Set(),
      startsMid: Boolean(end && t.first_frame > 1 + second && inside(end.first)),
      endsMid: Boolean(end && t.last_frame < last - second && inside(end.last)),
    };
  });
}

/**
 * @param {TrackFacts} t
 * @param {number} fps
 */
function trackRow(t, fps) {
  const from = clockText((t.first_frame - 1) / fps);
  const to = clockText(t.last_frame / fps);
  const notes = [`frames ${t.first_frame}–${t.last_frame}`];
  if (t.lines.size) notes.push(`crossed ${[...t.lines].join(", ")}`);
  if (t.startsMid) notes.push("starts mid-picture");
  if (t.endsMid) notes.push("ends mid-picture");
  return [
    el("span", { class: "when", text: `track ${t.id}` }),
    el("span", { class: "what", text: `${t.class || "unclassified"} · ${from}–${to} (${t.seconds.toFixed(1)} s)` }),
    el("span", { class: "detail", text: notes.join(" · ") }),
  ];
}
