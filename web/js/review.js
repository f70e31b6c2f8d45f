// @ts-check
// The review: its lists (count events, tracks; doubtful moments and edits are placeholders until
// those features exist) and what choosing from them does. Choosing a count event or a track takes the
// footage to its moment and makes its track stand out on the picture, the others dimmed; the strip
// under the playback controls says what is in focus and steps from one event to the next.

import { el, byId } from "./dom.js";
import { EventList, eventTime, eventWhat, eventTracks, directionGlyph } from "./review-events.js";
import { TrackList } from "./review-tracks.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./picture.js").Picture} Picture */
/** @typedef {import("./results.js").CountEvent} CountEvent */
/** @typedef {import("./protocol.js").TrackInfo} TrackInfo */

export class Review {
  /**
   * @param {PageStore} store
   * @param {Picture} picture
   */
  constructor(store, picture) {
    this.store = store;
    this.picture = picture;
    this.events = new EventList(store, (e) => this.showEvent(e));
    this.tracks = new TrackList(store, (t) => this.showTrack(t));
    this.strip = byId("focus-strip", HTMLElement);
    store.subscribe(["focus", "results"], () => this.showStrip());
    store.subscribe(["results"], () => { byId("review-empty", HTMLElement).hidden = Boolean(store.results); });
  }

  /** @param {CountEvent} e */
  showEvent(e) {
    this.picture.pause();
    this.picture.seekFrame(e.frame);
    this.store.focusChosen({ tracks: e.track_ids && e.track_ids.length ? e.track_ids : [e.track], event: e });
  }

  /** @param {TrackInfo} t */
  showTrack(t) {
    this.picture.pause();
    this.picture.seekFrame(t.first_frame);
    this.store.focusChosen({ tracks: [t.id], event: null });
  }

  /** What is in focus, with the way back to all tracks. */
  showStrip() {
    const focus = this.store.focus;
    this.strip.hidden = !focus;
    if (!focus) return;
    const clear = el("button", { type: "button", text: "Show all", "aria-label": "Show all tracks", onclick: () => this.store.focusChosen(null) });
    if (!focus.event) {
      const id = focus.tracks[0];
      const cls = this.store.tracks ? this.store.tracks.classes.get(id) : null;
      this.strip.replaceChildren(el("span", { text: `In focus: track ${id}${cls ? ` (${cls})` : ""}, its whole path drawn.` }), clear);
      return;
    }
    const e = focus.event;
    /** @param {number} d @param {string} text @param {string} name */
    const step = (d, text, name) => el("button", { type: "button", text, "aria-label": name, onclick: () => this.events.step(d) });
    this.strip.replaceChildren(
      el("span", {}, [directionGlyph(e), `${eventTime(e)} · ${eventWhat(e)} · ${eventTracks(e)}${e.inferred ? " · counted while hidden" : ""}`]),
      el("span", { class: "button-row" }, [step(-1, "\u2039 Previous", "Previous event"), step(1, "Next \u203A", "Next event"), clear]),
    );
  }
}
