// @ts-check
// The review's queue of doubtful moments: the moments of the count most likely wrong, most doubtful
// first, as the core lists them after every count (`throughline review` gives the same). Each says
// when, why in plain sentences, and which tracks; the person's decision (the count stands, or it
// was wrong) is kept by the moment's key and shown, and accepted moments can be hidden. Stepping
// through it goes on from where the person is, even when the moment in focus has just left the
// queue (its crossing rejected).

import { clockPart, isClock } from "./chart.js";
import { el, byId, clockText, revealInList } from "./dom.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./protocol.js").Doubt} Doubt */
/** @typedef {import("./protocol.js").DoubtKind} DoubtKind */

/** Each reason in a few words, for the list's headline and the focus strip. @type {Record<DoubtKind, string>} */
export const DOUBT_WORDS = {
  short_track: "short track",
  at_track_end: "near a track's start or end",
  joined_track: "pieces joined",
  close_together: "two crossings close together",
  hidden: "counted while hidden",
  barely_seen: "barely seen",
  starts_near_line: "appears near a line",
  ends_near_line: "vanishes near a line",
  on_line_at_footage_edge: "on a line as the footage starts or ends",
  class_changes: "class changes",
  starts_inside_zone: "appears inside a zone",
  ends_inside_zone: "vanishes inside a zone",
};

/**
 * The reasons of a doubtful moment in a few words: "two crossings close together, counted while hidden".
 * @param {Doubt} d
 */
export function doubtHeadline(d) {
  return d.kinds.map((k) => DOUBT_WORDS[k] || k.replace(/_/g, " ")).join(", ");
}

/**
 * The tracks of a doubtful moment in words: "track 7", "tracks 18 and 23".
 * @param {Doubt} d
 */
export function doubtTracks(d) {
  const t = d.tracks;
  if (!t.length) return "";
  return t.length === 1 ? `track ${t[0]}` : `tracks ${t.slice(0, -1).join(", ")} and ${t[t.length - 1]}`;
}

/** Rows drawn at first, and added by each press of "Show more". */
const ROWS_PER_PAGE = 300;

export class DoubtList {
  /**
   * @param {PageStore} store
   * @param {(doubt: Doubt) => void} choose show this moment
   */
  constructor(store, choose) {
    this.store = store;
    this.choose = choose;
    this.list = byId("doubtful-list", HTMLElement);
    this.badge = byId("doubtful-count", HTMLElement);
    this.status = byId("doubtful-status", HTMLElement);
    this.hideAccepted = byId("hide-accepted", HTMLInputElement);
    /** @type {Map<string, HTMLButtonElement>} */
    this.buttons = new Map();
    /** Where in the list shown the last moment chosen was, to go on from there when it leaves. */
    this.lastIndex = -1;
    /** How many rows are drawn: a busy hour has thousands of moments, and a row per moment would
     * make every click on the page slow. Next and Previous go on past the last row drawn. */
    this.rowsDrawn = ROWS_PER_PAGE;
    this.hideAccepted.addEventListener("change", () => this.show());
    store.subscribe(["tracks"], () => { this.rowsDrawn = ROWS_PER_PAGE; });
    store.subscribe(["results", "marks", "tracks"], () => this.show());
    store.subscribe(["focus"], () => this.mark());
  }

  /** The moments listed: all, or all but the accepted ones. */
  shown() {
    const marks = this.store.work.marks;
    return this.store.doubts.filter((d) => !(this.hideAccepted.checked && marks.get(d.key) === "accepted"));
  }

  show() {
    const doubts = this.store.doubts;
    const marks = this.store.work.marks;
    const shown = this.shown();
    const place = new Map(doubts.map((d, i) => [d.key, i + 1]));
    this.buttons = new Map();
    const rows = shown.slice(0, this.rowsDrawn).map((d) => {
      const b = el("button", { type: "button", class: "doubt", onclick: () => this.chosen(d) }, doubtRow(d, place.get(d.key) || 0, marks.get(d.key), this.store.fps));
      this.buttons.set(d.key, b);
      return el("li", {}, b);
    });
    const left = shown.length - rows.length;
    if (left > 0) {
      const more = el("button", { type: "button", text: `Show ${Math.min(left, ROWS_PER_PAGE)} more (${left} not listed yet)`, onclick: () => this.drawMore(ROWS_PER_PAGE, true) });
      rows.push(el("li", { class: "more" }, [more]));
    }
    this.list.replaceChildren(...rows);
    const decided = doubts.filter((d) => marks.has(d.key)).length;
    this.badge.textContent = this.store.results ? `${doubts.length - decided}` : "";
    this.status.textContent = this.statusText(doubts.length, decided, shown.length);
    this.mark();
  }

  /**
   * @param {number} all
   * @param {number} decided
   * @param {number} shown
   */
  statusText(all, decided, shown) {
    if (!this.store.results) return "";
    if (!all) return "Nothing doubtful in this count. Still check a sample against the footage before relying on it.";
    const hidden = all - shown ? `; ${all - shown} accepted hidden` : "";
    const said = `${all} moments to check, most doubtful first: ${decided} decided, ${all - decided} to go${hidden}.`;
    // Not a list to finish (as the command line's review says; a newcomer's trial: 62 moments for
    // 26 crossings, and nothing said where to stop).
    const counted = this.store.results ? this.store.results.report.events.filter((e) => !e.added).length : 0;
    const long = all > 100 || all > counted;
    return long ? `${said} Not a list to finish: mistakes gather at its top. Go down it as far as time allows, then count a sample by hand (Hand count) to see how far the counts can be trusted.` : said;
  }

  /** @param {Doubt} d */
  chosen(d) {
    this.lastIndex = this.shown().indexOf(d);
    this.choose(d);
  }

  /**
   * @param {number} rows draws this many more rows
   * @param {boolean} [focusNew] moves the keyboard focus to the first new row (Show more was pressed)
   */
  drawMore(rows, focusNew = false) {
    const first = this.rowsDrawn;
    this.rowsDrawn += rows;
    this.show();
    const shown = this.shown();
    const button = shown[first] ? this.buttons.get(shown[first].key) : undefined;
    if (focusNew && button) button.focus();
  }

  /** The chosen moment's row is marked as the current one (drawn first, if it was beyond the rows drawn). */
  mark() {
    const focus = this.store.focus;
    const key = focus && focus.doubt ? focus.doubt.key : null;
    if (key && !this.buttons.has(key)) {
      const at = this.shown().findIndex((d) => d.key === key);
      if (at >= this.rowsDrawn) {
        this.drawMore(Math.ceil((at + 1 - this.rowsDrawn) / ROWS_PER_PAGE) * ROWS_PER_PAGE);
        return;
      }
    }
    for (const [k, b] of this.buttons) b.setAttribute("aria-current", String(k === key));
    const current = key ? this.buttons.get(key) : undefined;
    if (current) revealInList(this.list, current);
  }

  /**
   * Chooses the moment `step` places after (or before) the one in focus; with none in focus, Next
   * chooses the first one not yet decided. False when there is none.
   * @param {number} step 1 or -1
   */
  step(step) {
    const list = this.shown();
    const focus = this.store.focus;
    const key = focus && focus.doubt ? focus.doubt.key : null;
    const at = key ? list.findIndex((d) => d.key === key) : -1;
    let next;
    if (at >= 0) next = at + step;
    // The moment in focus left the list (decided and hidden, or its crossing rejected): the ones
    // after it moved up into its place.
    else if (key && this.lastIndex >= 0) next = step > 0 ? this.lastIndex : this.lastIndex - 1;
    else next = step > 0 ? Math.max(0, list.findIndex((d) => !this.store.work.marks.has(d.key))) : list.length - 1;
    const d = list[next];
    if (!d) return false;
    this.chosen(d);
    return true;
  }
}

/**
 * @param {Doubt} d
 * @param {number} n its place in the queue, from 1
 * @param {import("./work.js").Decision | undefined} decision
 * @param {number} fps the frame rate: the time shown is the frame's, as the clock under the picture shows it
 */
function doubtRow(d, n, decision, fps) {
  const badge = decision ? el("span", { class: `decision ${decision}`, text: decision === "accepted" ? "\u2713 accepted" : "\u2717 rejected" }) : null;
  const where = [doubtTracks(d), `frame ${d.frame}`];
  if (isClock(d.time)) where.push(clockPart(d.time));
  return [
    el("span", { class: "when", text: clockText((d.frame - 1) / fps) }),
    el("span", { class: "what" }, [`${n}. ${doubtHeadline(d)}`, badge ? " " : null, badge]),
    el("span", { class: "detail" }, [...d.why.map((w) => el("span", { class: "why", text: quoted(w) })), el("span", { text: where.join(" · ") })]),
  ];
}

/**
 * The core writes names in its sentences between backticks (as the command line prints them); on
 * the page they read as quoted names: `east-west divide` → “east-west divide”.
 * @param {string} text
 */
function quoted(text) {
  return text.replace(/`([^`]*)`/g, "\u201C$1\u201D");
}
