// @ts-check
// The review's list of count events: every crossing of a line and every entry to or exit from a
// zone that the counts are made of, in the report's order, each with a picture of what was counted
// (cut from the footage when its row comes into view), then the crossings the person rejected.
// Choosing one shows that moment: the footage goes to its frame and its track stands out.

import { clockPart, isClock } from "./chart.js";
import { el, byId, clockText, revealInList } from "./dom.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./results.js").CountEvent} CountEvent */
/** @typedef {import("./results.js").Report} Report */

const MAX_EVENTS_SHOWN = 2000;

export class EventList {
  /**
   * @param {PageStore} store
   * @param {(event: CountEvent) => void} choose show this event's moment
   * @param {import("./evidence.js").Evidence} evidence pictures of the events, cut from the footage
   */
  constructor(store, choose, evidence) {
    this.store = store;
    this.choose = choose;
    this.evidence = evidence;
    this.list = byId("events", HTMLElement);
    this.badge = byId("events-count", HTMLElement);
    /** @type {HTMLButtonElement[]} */
    this.buttons = [];
    /** @type {Map<Element, CountEvent>} the pictures waiting to be cut, by their image */
    this.pictured = new Map();
    // Pictures are cut only for the rows scrolled into view.
    this.seen = new IntersectionObserver((entries) => {
      for (const entry of entries) if (entry.isIntersecting) this.fillPicture(entry.target);
    });
    store.subscribe(["results", "footage", "video"], () => this.show());
    store.subscribe(["focus"], () => this.mark());
  }

  show() {
    const report = this.store.results ? this.store.results.report : null;
    const events = report ? report.events : [];
    const rejected = report ? report.rejected_events || [] : [];
    const deleted = report ? report.deleted_events || [] : [];
    const shown = events.slice(0, MAX_EVENTS_SHOWN);
    this.seen.disconnect();
    this.pictured = new Map();
    this.buttons = shown.map((e) => this.row(e, ""));
    this.list.replaceChildren(...this.buttons.map((b) => el("li", {}, b)));
    if (events.length > shown.length) {
      this.list.append(el("li", { class: "more", text: `… and ${events.length - shown.length} more, in the exported report.` }));
    }
    if (rejected.length) {
      this.list.append(el("li", { class: "list-head", text: "Rejected by you: not counted" }), ...rejected.map((e) => el("li", {}, this.row(e, "rejected"))));
    }
    if (deleted.length) {
      this.list.append(el("li", { class: "list-head", text: "Made by tracks you deleted: not counted" }), ...deleted.map((e) => el("li", {}, this.row(e, "deleted"))));
    }
    this.badge.textContent = report ? `${events.length}` : "";
    this.mark();
  }

  /**
   * One event's row, its picture to be cut when it comes into view.
   * @param {CountEvent} e
   * @param {Uncounted} uncounted why it is in no count ("": it is counted)
   */
  row(e, uncounted) {
    const img = el("img", { class: "thumb", alt: `Picture of ${eventWhat(e)} at ${clockText(e.seconds)}`, width: 56, height: 56 });
    const b = el("button", { type: "button", class: uncounted ? "rejected" : null, onclick: () => this.choose(e) }, [...eventRow(e, uncounted), img]);
    if (this.evidence.available()) {
      this.pictured.set(img, e);
      this.seen.observe(img);
    } else {
      img.hidden = true;
    }
    return b;
  }

  /** @param {Element} img */
  fillPicture(img) {
    const e = this.pictured.get(img);
    this.seen.unobserve(img);
    if (!e || !(img instanceof HTMLImageElement)) return;
    this.evidence.picture(e).then((url) => { if (url) img.src = url; else img.hidden = true; });
  }

  /** The chosen event's row is marked as the current one. */
  mark() {
    const report = this.store.results ? this.store.results.report : null;
    const focus = this.store.focus;
    const index = report && focus && focus.event ? report.events.indexOf(focus.event) : -1;
    this.buttons.forEach((b, i) => b.setAttribute("aria-current", String(i === index)));
    if (index >= 0 && this.buttons[index]) revealInList(this.list, this.buttons[index]);
  }

  /**
   * Chooses the event `step` places after (or before) the chosen one; false when there is none.
   * @param {number} step
   */
  step(step) {
    const report = this.store.results ? this.store.results.report : null;
    const focus = this.store.focus;
    if (!report || !focus || !focus.event) return false;
    const next = report.events[report.events.indexOf(focus.event) + step];
    if (!next) return false;
    this.choose(next);
    return true;
  }
}

/**
 * When an event happened in the footage (m:ss.cc), and the time of day after it when the plan has a
 * start time.
 * @param {CountEvent} e
 */
export function eventTime(e) {
  return isClock(e.time) ? `${clockText(e.seconds)} (${clockPart(e.time)})` : clockText(e.seconds);
}

/**
 * What an event is, in words: "plaza midline: towards camera", "kiosk: entry".
 * @param {CountEvent} e
 */
export function eventWhat(e) {
  return e.kind === "screenline" ? `${e.name}: ${e.label}` : `${e.name}: ${e.direction}`;
}

/**
 * The tracks an event counted: one, or the pieces of one path joined; none for one added by hand.
 * @param {CountEvent} e
 */
export function eventTracks(e) {
  if (e.added) return "added by hand";
  const ids = e.track_ids && e.track_ids.length ? e.track_ids : [e.track];
  return ids.length > 1 ? `tracks ${ids.slice(0, -1).join(", ")} and ${ids[ids.length - 1]} (one path, joined)` : `track ${ids[0]}`;
}

/**
 * A triangle in the direction's colour (outlined where the track was hidden), or nothing for zones.
 * @param {CountEvent} e
 */
export function directionGlyph(e) {
  if (e.kind !== "screenline") return null;
  const forward = e.direction === "forward";
  const glyph = e.inferred ? (forward ? "\u25B3" : "\u25BD") : forward ? "\u25B2" : "\u25BC";
  return el("span", { class: `dir ${forward ? "forward" : "backward"}`, "aria-hidden": "true", text: `${glyph} ` });
}

/**
 * Why an event is in no count: "rejected" (a person rejected it), "deleted" (its track was
 * deleted), or "" (it is counted).
 * @typedef {"" | "rejected" | "deleted"} Uncounted
 */

/**
 * @param {CountEvent} e
 * @param {Uncounted} uncounted
 */
function eventRow(e, uncounted) {
  const detail = [e.class || "unclassified", eventTracks(e), `frame ${e.frame}`];
  if (isClock(e.time)) detail.push(clockPart(e.time));
  if (e.inferred) detail.push("counted while hidden");
  if (uncounted) detail.push(uncounted === "rejected" ? "rejected" : "its track deleted");
  if (e.reason) detail.push(`why: ${e.reason}`);
  return [
    el("span", { class: "when", text: clockText(e.seconds) }),
    el("span", { class: "what" }, [directionGlyph(e), eventWhat(e)]),
    el("span", { class: "detail", text: detail.join(" · ") }),
  ];
}
