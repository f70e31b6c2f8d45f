// @ts-check
// The review: its lists (doubtful moments, tracks, count events, edits), what choosing from them
// does, and the decisions and corrections made there. Choosing a moment takes the footage to it
// and makes its tracks stand out on the picture, the others dimmed; the strip under the playback
// controls says what is in focus, steps to the next, and takes the decision (accept, reject). The
// corrections go to the store as edits; the core counts again with them.

import { byId } from "./dom.js";
import { EventList } from "./review-events.js";
import { TrackList } from "./review-tracks.js";
import { DoubtList } from "./review-doubts.js";
import { EditList, directionLabel } from "./review-edits.js";
import { FocusStrip } from "./focus-strip.js";
import { TrackActions, offerClasses } from "./track-edits.js";
import { AddCrossingForm, AddZoneEventForm, rejectEdit } from "./crossing-edits.js";
import { withReason, sameEdit, rejectionOf } from "./edits.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./picture.js").Picture} Picture */
/** @typedef {import("./core-client.js").CoreClient} CoreClient */
/** @typedef {import("./evidence.js").Evidence} Evidence */
/** @typedef {import("./results.js").CountEvent} CountEvent */
/** @typedef {import("./protocol.js").TrackInfo} TrackInfo */
/** @typedef {import("./protocol.js").Doubt} Doubt */
/** @typedef {import("./edits.js").RejectEdit} RejectEdit */
/** @typedef {import("./edits.js").RejectZoneEdit} RejectZoneEdit */

export class Review {
  /**
   * @param {PageStore} store
   * @param {Picture} picture
   * @param {CoreClient} client
   * @param {Evidence} evidence
   */
  constructor(store, picture, client, evidence) {
    this.store = store;
    this.picture = picture;
    this.events = new EventList(store, (e) => this.showEvent(e), evidence);
    this.tracks = new TrackList(store, (t) => this.showTrack(t));
    this.doubts = new DoubtList(store, (d) => this.showDoubt(d));
    new EditList(store, client, (frame, tracks) => this.showMoment(frame, tracks));
    this.strip = new FocusStrip(store, {
      stepEvent: (d) => this.events.step(d),
      stepDoubt: (d) => this.stepDoubt(d),
      accept: () => this.accept(),
      reject: () => this.reject(),
      canReject: () => Boolean(this.rejectable()),
    });
    new TrackActions(store, byId("focus-track-actions", HTMLElement));
    new TrackActions(store, byId("tracks-correct", HTMLElement), " (Tracks list)");
    new AddCrossingForm(store);
    new AddZoneEventForm(store);
    const classes = byId("class-choices", HTMLDataListElement);
    store.subscribe(["detections", "tracks"], () => offerClasses(store, classes));
    store.subscribe(["results"], () => { byId("review-empty", HTMLElement).hidden = Boolean(store.results); });
  }

  /** @param {CountEvent} e */
  showEvent(e) {
    this.showMoment(e.frame, e.track_ids && e.track_ids.length ? e.track_ids : e.track ? [e.track] : [], e);
  }

  /** @param {TrackInfo} t */
  showTrack(t) {
    this.showMoment(t.first_frame, [t.id]);
  }

  /** @param {Doubt} d */
  showDoubt(d) {
    this.strip.say("");
    this.picture.pause();
    this.picture.seekFrame(d.frame);
    this.store.focusChosen({ tracks: d.tracks, event: this.eventOf(d), doubt: d });
  }

  /**
   * The footage at `frame`, with these tracks (and this event) in focus.
   * @param {number} frame
   * @param {number[]} tracks
   * @param {CountEvent | null} [event]
   */
  showMoment(frame, tracks, event = null) {
    this.strip.say("");
    this.picture.pause();
    this.picture.seekFrame(frame);
    this.store.focusChosen(tracks.length || event ? { tracks, event } : null);
  }

  /**
   * The count event a doubtful moment is about, when it is a crossing still counted.
   * @param {Doubt} d
   */
  eventOf(d) {
    const c = d.crossing;
    const report = this.store.results ? this.store.results.report : null;
    if (!c || !report) return null;
    return report.events.find((e) => e.kind === "screenline" && e.name === c.screenline && e.direction === c.direction && e.track === c.track && e.frame === c.frame) || null;
  }

  /**
   * The next (1) or previous (-1) doubtful moment, shown in the To check list.
   * @param {number} step
   */
  stepDoubt(step) {
    if (this.store.view === "review" && this.store.reviewTab !== "doubtful") this.store.reviewTabChosen("doubtful");
    if (!this.doubts.step(step)) this.strip.say(step > 0 ? "That was the last doubtful moment." : "That was the first doubtful moment.");
  }

  /** The count stands: the doubtful moment in focus is accepted. */
  accept() {
    const d = this.store.focus ? this.store.focus.doubt : null;
    if (!d) return;
    this.store.doubtDecided(d.key, "accepted");
    this.strip.say("Accepted: the count stands. N goes on to the next moment.");
  }

  /**
   * The crossing in focus that a Reject would take out of the counts: the doubtful moment's
   * crossing, or the count event chosen (a crossing, or a zone's entry or exit).
   * @returns {RejectEdit | RejectZoneEdit | null}
   */
  rejectable() {
    const focus = this.store.focus;
    if (!focus) return null;
    if (focus.doubt) {
      return rejectionOf(focus.doubt.crossing);
    }
    return rejectEdit(focus.event);
  }

  /** The count is wrong: its crossing (or entry or exit) is rejected (with a reason, if the person gives one). */
  reject() {
    const focus = this.store.focus;
    if (!focus) return;
    const d = focus.doubt || null;
    const edit = this.rejectable();
    if (!edit) {
      if (!d) return;
      this.store.doubtDecided(d.key, "rejected");
      this.strip.say("Marked as wrong. Correct its track with the buttons below: merge, split, delete or change its class.");
      return;
    }
    const mark = d ? { key: d.key, decision: /** @type {const} */ ("rejected") } : null;
    const what = edit.edit === "reject_zone_event" ? edit.way : "crossing";
    if (this.store.work.edits.some((e) => sameEdit(e, edit) || sameEdit({ ...e, reason: undefined }, edit))) {
      if (mark) this.store.doubtDecided(mark.key, mark.decision);
      return this.strip.say(`That ${what} is rejected already.`);
    }
    // Two crossings close together: either may be the one counted twice (they can differ in
    // class); the person chooses, the later one first.
    const other = d ? rejectionOf(d.close_to) : null;
    /** @type {(RejectEdit | RejectZoneEdit)[]} */
    const edits = other ? [other, edit] : [edit];
    const said = (/** @type {RejectEdit | RejectZoneEdit} */ e) => e.edit === "reject_zone_event"
      ? `the ${e.way} ${e.way === "entry" ? "to" : "from"} ${e.zone} by track ${e.track} at frame ${e.frame}${classOf(this.store, e)}`
      : `${e.screenline}, ${directionLabel(this.store, e.screenline, e.direction)}, by track ${e.track} at frame ${e.frame}${classOf(this.store, e)}`;
    const words = other
      ? "Reject one of the two crossings: it will not be counted. Why (optional)?"
      : edit.edit === "reject_zone_event"
        ? `Reject ${said(edit)}: it will not be counted. Why (optional)?`
        : `Reject the crossing of ${said(edit)}: it will not be counted. Why (optional)?`;
    this.strip.askReason(words, (reason, chosen) => {
      this.store.correctionMade(withReason(edits[chosen] || edit, reason), mark);
      this.strip.say("Rejected: the counts no longer include it. Undo (Ctrl+Z) takes it back.");
    }, other ? edits.map(said) : [], what);
  }
}

/**
 * " (cyclist)": the class of the counted crossing (or entry or exit) an edit names, when the report has it.
 * @param {PageStore} store
 * @param {RejectEdit | RejectZoneEdit} e
 */
function classOf(store, e) {
  const [kind, name] = e.edit === "reject_zone_event" ? ["zone", e.zone] : ["screenline", e.screenline];
  const found = store.results ? store.results.report.events.find((x) => x.kind === kind && x.name === name && x.track === e.track && x.frame === e.frame) : null;
  return found && found.class ? ` (${found.class})` : "";
}
