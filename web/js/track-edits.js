// @ts-check
// Corrections of a track, offered wherever a track is in focus (the strip under the footage, the
// Tracks list): join it with another track (the tracks that do not overlap it in time, nearest
// first), split it at the frame shown, leave it out, or give it another class (the detections'
// classes, or one typed), each with an optional reason. The forms stay put while the person types:
// only the row of buttons follows the focus.

import { el, clockText } from "./dom.js";
import { trackRef, withReason } from "./edits.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./protocol.js").TrackInfo} TrackInfo */
/** @typedef {"merge" | "split" | "delete" | "class"} Action */

/** Most tracks offered to merge with. */
const MAX_CANDIDATES = 30;

export class TrackActions {
  /**
   * @param {PageStore} store
   * @param {HTMLElement} root where the buttons and forms go
   * @param {string} where how the buttons' names say where they are ("" or " (Tracks list)")
   */
  constructor(store, root, where = "") {
    this.store = store;
    this.root = root;
    this.where = where;
    this.bar = el("div", { class: "button-row track-actions" });
    this.form = el("form", { class: "edit-form", hidden: true });
    this.form.addEventListener("keydown", (e) => { if (e.key === "Escape") { e.stopPropagation(); this.close(); } });
    root.replaceChildren(this.bar, this.form);
    /** @type {{action: Action, id: number} | null} the form open, for which track */
    this.open = null;
    this.chosen = -1;
    store.subscribe(["focus", "tracks"], () => this.show());
    store.subscribe(["frame"], () => this.showFrame());
    this.show();
  }

  /** The track the actions are for: the one chosen among those in focus. */
  track() {
    const focus = this.store.focus;
    const tracks = this.store.tracks;
    if (!focus || !tracks || !focus.tracks.length) return null;
    const id = focus.tracks.includes(this.chosen) ? this.chosen : focus.tracks[0];
    return tracks.list.find((t) => t.id === id) || null;
  }

  show() {
    const t = this.track();
    this.root.hidden = !t;
    if (!t) return this.close();
    if (this.open && this.open.id !== t.id) this.close();
    const ids = this.store.focus ? this.store.focus.tracks : [];
    /** @param {Action} action @param {string} text @param {string} name */
    const button = (action, text, name) => el("button", { type: "button", text, "aria-label": `${name}${this.where}`, onclick: () => this.start(action) });
    this.bar.replaceChildren(
      ids.length > 1 ? this.chooser(ids, t.id) : el("span", { class: "lead", text: `Correct track ${t.id}:` }),
      button("merge", "Merge\u2026", "Merge with another track"),
      button("split", "Split here\u2026", "Split here, at this frame"),
      button("delete", "Delete\u2026", "Delete this track"),
      button("class", "Class\u2026", "Change class"),
    );
    this.showFrame();
  }

  /**
   * A choice of which of the tracks in focus to correct.
   * @param {number[]} ids
   * @param {number} id the one chosen now
   */
  chooser(ids, id) {
    const select = el("select", { "aria-label": `Track to correct${this.where}` }, ids.map((i) => el("option", { value: String(i), text: `track ${i}` })));
    select.value = String(id);
    select.addEventListener("change", () => { this.chosen = Number(select.value); this.show(); });
    return el("label", { class: "inline lead" }, ["Correct ", select]);
  }

  /** Split is offered only where the track is: after its first frame, up to its last. */
  showFrame() {
    const t = this.track();
    const split = this.bar.querySelector(`[aria-label="Split here, at this frame${this.where}"]`);
    const inside = Boolean(t && this.store.frame > t.first_frame && this.store.frame <= t.last_frame);
    if (split instanceof HTMLButtonElement) {
      split.disabled = !inside;
      split.title = inside ? "" : "Go to a frame inside the track (after its first frame) to split it there";
    }
    const at = this.form.querySelector(".at-frame");
    if (at && t) at.textContent = this.frameWords(t);
  }

  /**
   * @param {TrackInfo} t
   */
  frameWords(t) {
    const f = this.store.frame;
    if (f <= t.first_frame || f > t.last_frame) return `Frame ${f} is not inside track ${t.id} (frames ${t.first_frame}–${t.last_frame}): step to where the second object begins.`;
    return `From frame ${f} (${clockText((f - 1) / this.store.fps)}) on, its boxes become a new track.`;
  }

  /** @param {Action} action */
  start(action) {
    const t = this.track();
    if (!t) return;
    this.open = { action, id: t.id };
    const reason = el("input", { type: "text", autocomplete: "off", "aria-label": "Reason (optional)", placeholder: "why (optional)" });
    const parts = this.fields(action, t);
    const submit = parts.submit ? el("button", { type: "submit", class: "primary", text: parts.submit }) : null;
    const cancel = el("button", { type: "button", text: "Cancel", onclick: () => this.close() });
    this.form.replaceChildren(el("p", { class: "form-head", text: parts.head }), ...parts.nodes, el("label", {}, ["Reason ", reason]), el("div", { class: "button-row" }, [submit, cancel]));
    this.form.onsubmit = (e) => {
      e.preventDefault();
      const edit = parts.edit();
      if (!edit) return;
      this.store.correctionMade(withReason(edit, reason.value));
      this.close();
      // What is left of the track stays in focus: the track it joined, or nothing once left out.
      if (edit.edit === "merge_tracks") this.store.focusChosen({ tracks: [edit.into.id], event: null });
      if (edit.edit === "delete_track") this.store.focusChosen(null);
    };
    this.form.hidden = false;
    const first = this.form.querySelector("select, input");
    if (first instanceof HTMLElement) first.focus();
  }

  close() {
    this.open = null;
    this.form.hidden = true;
    this.form.replaceChildren();
  }

  /**
   * The fields of each form and the edit it makes.
   * @param {Action} action
   * @param {TrackInfo} t
   * @returns {{head: string, nodes: Node[], submit: string, edit: () => import("./edits.js").Edit | null}} `submit` "": nothing to make
   */
  fields(action, t) {
    const ref = trackRef(t);
    if (action === "delete") return { head: `Leave track ${t.id} out of the counts: not an object to count (a shadow, a reflection).`, nodes: [], submit: "Delete track", edit: () => ({ edit: "delete_track", track: ref }) };
    if (action === "split") {
      return {
        head: `Split track ${t.id}: two objects in one track.`,
        nodes: [el("p", { class: "hint at-frame", text: this.frameWords(t) })],
        submit: "Split",
        edit: () => (this.store.frame > t.first_frame && this.store.frame <= t.last_frame ? { edit: "split_track", track: ref, at_frame: this.store.frame } : null),
      };
    }
    if (action === "class") {
      const input = el("input", { type: "text", list: "class-choices", autocomplete: "off", value: t.class || "", "aria-label": "New class" });
      return { head: `Track ${t.id} is counted as ${t.class || "unclassified"}. What is it?`, nodes: [el("label", {}, ["New class ", input])], submit: "Set class", edit: () => (input.value.trim() ? { edit: "set_class", track: ref, class: input.value.trim() } : null) };
    }
    return this.mergeFields(t);
  }

  /**
   * The merge form: the tracks it could be one object with, nearest first.
   * @param {TrackInfo} t
   */
  mergeFields(t) {
    const options = mergeCandidates(t, this.store.tracks ? this.store.tracks.list : [], this.store.fps);
    if (!options.length) return { head: `Every other track is seen while track ${t.id} is: none can be the same object.`, nodes: [], submit: "", edit: () => null };
    const select = el("select", { "aria-label": "Track to merge with" }, options.map((o) => el("option", { value: String(o.track.id), text: o.words })));
    const byId = new Map(options.map((o) => [o.track.id, o.track]));
    return {
      head: `Track ${t.id} and another are one object (lost and found again). Merge with:`,
      nodes: [select],
      submit: "Merge",
      edit: () => {
        const other = byId.get(Number(select.value));
        if (!other) return null;
        // The later track joins the earlier one, which keeps its number.
        const [early, late] = other.first_frame < t.first_frame ? [other, t] : [t, other];
        return /** @type {import("./edits.js").MergeEdit} */ ({ edit: "merge_tracks", track: trackRef(late), into: trackRef(early) });
      },
    };
  }
}

/**
 * The tracks that could be the same object as `t`: those not seen in any frame `t` is in, nearest
 * first by the time between them plus the distance (in box heights) between where one ended and
 * the other began.
 * @param {TrackInfo} t
 * @param {TrackInfo[]} all
 * @param {number} fps
 * @returns {{track: TrackInfo, words: string}[]}
 */
export function mergeCandidates(t, all, fps) {
  const scored = all.filter((o) => o.id !== t.id && (o.last_frame < t.first_frame || o.first_frame > t.last_frame)).map((o) => {
    const before = o.last_frame < t.first_frame;
    const gap = (before ? t.first_frame - o.last_frame : o.first_frame - t.last_frame) / fps;
    const [a, b] = before ? [o.last_box, t.first_box] : [t.last_box, o.first_box];
    const heights = boxHeights(a, b);
    const words = `track ${o.id} · ${o.class || "unclassified"} · ${before ? "ends" : "starts"} ${gap.toFixed(1)} s ${before ? "before" : "after"}${Number.isFinite(heights) ? `, ${heights.toFixed(1)} box heights away` : ""}`;
    return { track: o, words, score: gap + (Number.isFinite(heights) ? heights : 10) };
  });
  return scored.sort((x, y) => x.score - y.score).slice(0, MAX_CANDIDATES);
}

/**
 * The distance between two boxes' bottom centres in their mean height; Infinity when unknown.
 * @param {number[] | undefined} a
 * @param {number[] | undefined} b
 */
function boxHeights(a, b) {
  if (!a || !b || a.length < 4 || b.length < 4) return Infinity;
  const h = (a[3] + b[3]) / 2;
  if (!(h > 0)) return Infinity;
  return Math.hypot(a[0] + a[2] / 2 - (b[0] + b[2] / 2), a[1] + a[3] - (b[1] + b[3])) / h;
}

/**
 * Fills the list of classes offered when a class is chosen or typed: the detections' classes and
 * the tracks' own.
 * @param {PageStore} store
 * @param {HTMLDataListElement} list
 */
export function offerClasses(store, list) {
  const classes = new Set(store.detections ? store.detections.summary.classes : []);
  for (const t of store.tracks ? store.tracks.list : []) if (t.class) classes.add(t.class);
  list.replaceChildren(...[...classes].sort().map((c) => el("option", { value: c })));
}
