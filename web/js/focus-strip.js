// @ts-check
// The strip under the playback controls: what is in focus (a doubtful moment, a count event or a
// track), the way from one to the next, the decisions on a doubtful moment, and the question of
// why when a crossing is rejected. Its parts are kept, not rebuilt: the reason being typed stays
// while the counts change under it. The keys each button answers to are written on it.

import { el, byId, clockText } from "./dom.js";
import { eventTime, eventWhat, eventTracks, directionGlyph } from "./review-events.js";
import { doubtHeadline, doubtTracks } from "./review-doubts.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./protocol.js").Doubt} Doubt */
/** @typedef {import("./edits.js").RejectEdit} RejectEdit */
/**
 * What the strip's buttons do.
 * @typedef {object} StripActions
 * @property {(step: number) => void} stepEvent
 * @property {(step: number) => void} stepDoubt
 * @property {() => void} accept
 * @property {() => void} reject
 * @property {() => boolean} canReject whether the thing in focus can be rejected
 */

export class FocusStrip {
  /**
   * @param {PageStore} store
   * @param {StripActions} actions
   */
  constructor(store, actions) {
    this.store = store;
    this.actions = actions;
    this.root = byId("focus-strip", HTMLElement);
    this.what = byId("focus-what", HTMLElement);
    this.buttons = byId("focus-buttons", HTMLElement);
    this.note = byId("focus-note", HTMLElement);
    this.form = byId("reject-form", HTMLFormElement);
    this.reason = byId("reject-reason", HTMLInputElement);
    this.question = byId("reject-question", HTMLElement);
    /** @type {((reason: string, chosen: number) => void) | null} what the reject form's answer does */
    this.answer = null;
    this.form.addEventListener("submit", (e) => { e.preventDefault(); this.submit(); });
    byId("reject-cancel", HTMLButtonElement).addEventListener("click", () => this.closeForm());
    this.form.addEventListener("keydown", (e) => { if (e.key === "Escape") { e.stopPropagation(); this.closeForm(); } });
    /** @type {{focus: string, edits: number} | null} what the note was said about (`focusKey`) */
    this.noteFor = null;
    store.subscribe(["focus", "results", "marks", "edits"], () => this.show());
  }

  show() {
    const focus = this.store.focus;
    // A note is about the moment and the corrections it was said with: another moment, or another
    // correction since (an added crossing after a rejection), and it goes.
    const n = this.noteFor;
    if (n && (n.focus !== focusKey(focus) || n.edits !== this.store.work.edits.length)) this.say("");
    this.root.hidden = !focus;
    if (!focus) {
      this.closeForm();
      this.note.textContent = "";
      return;
    }
    if (focus.doubt) this.showDoubt(focus.doubt);
    else if (focus.event) this.showEvent(focus.event);
    else this.showTrack(focus.tracks[0]);
  }

  /** @param {Doubt} d */
  showDoubt(d) {
    const n = this.store.doubts.findIndex((x) => x.key === d.key);
    const decision = this.store.work.marks.get(d.key);
    const place = n >= 0 ? `Doubtful moment ${n + 1} of ${this.store.doubts.length}` : "Doubtful moment (corrected: no longer in the queue)";
    // The time of the frame the footage goes to, as the clock under the picture shows it (a
    // crossing's own moment falls between two frames).
    const parts = [place, clockText((d.frame - 1) / this.store.fps), doubtTracks(d), doubtHeadline(d)];
    if (decision) parts.push(decision === "accepted" ? "\u2713 accepted" : "\u2717 rejected");
    this.what.replaceChildren(el("span", { class: "doubt-mark", "aria-hidden": "true", text: "\u25CC " }), parts.filter(Boolean).join(" · "));
    this.buttons.replaceChildren(
      this.button("\u2039 Previous", "P", "Previous doubtful moment", () => this.actions.stepDoubt(-1)),
      this.button("Next \u203A", "N", "Next doubtful moment", () => this.actions.stepDoubt(1)),
      this.button("Accept", "A", "Accept: the count stands", () => this.actions.accept()),
      this.button("Reject", "R", "Reject: the count is wrong", () => this.actions.reject()),
      this.clearButton(),
    );
  }

  /** @param {import("./results.js").CountEvent} e */
  showEvent(e) {
    const flags = [];
    if (e.inferred) flags.push("counted while hidden");
    const glyph = directionGlyph(e);
    this.what.replaceChildren(...(glyph ? [glyph] : []), [eventTime(e), eventWhat(e), eventTracks(e), ...flags].join(" · "));
    const what = e.kind === "zone" ? e.direction : "crossing";
    const reject = this.actions.canReject() ? this.button(`Reject ${what}`, "R", `Reject this ${what}`, () => this.actions.reject()) : null;
    this.buttons.replaceChildren(
      this.button("\u2039 Previous", "", "Previous event", () => this.actions.stepEvent(-1)),
      this.button("Next \u203A", "", "Next event", () => this.actions.stepEvent(1)),
      ...(reject ? [reject] : []),
      this.clearButton(),
    );
  }

  /** @param {number} id */
  showTrack(id) {
    const cls = this.store.tracks ? this.store.tracks.classes.get(id) : null;
    this.what.replaceChildren(`In focus: track ${id}${cls ? ` (${cls})` : ""}, its whole path drawn${this.store.results ? " as counted, over dots where its boxes were" : ""}.`);
    this.buttons.replaceChildren(this.clearButton());
  }

  /**
   * A button with the key it answers to written on it.
   * @param {string} text
   * @param {string} key "" for none
   * @param {string} name what it is called (for assistive technology and tests)
   * @param {() => void} act
   */
  button(text, key, name, act) {
    return el("button", { type: "button", "aria-label": name, title: key ? `${name} (${key})` : name, onclick: act }, [text, key ? el("kbd", { text: key }) : null]);
  }

  clearButton() {
    return el("button", { type: "button", text: "Show all", "aria-label": "Show all tracks", onclick: () => this.store.focusChosen(null) });
  }

  /**
   * Asks why a crossing (or a zone's entry or exit) is rejected (the answer may be blank), and, when `choices` are given (two
   * crossings close together), which one; `then` makes the correction with the reason and the
   * index of the choice.
   * @param {string} question
   * @param {(reason: string, chosen: number) => void} then
   * @param {string[]} [choices] each crossing in words; the last is chosen at first
   * @param {string} [what] what is rejected: "crossing", "entry" or "exit"
   */
  askReason(question, then, choices = [], what = "crossing") {
    this.question.textContent = question;
    byId("reject-submit", HTMLButtonElement).textContent = `Reject ${what}`;
    this.answer = then;
    this.reason.value = "";
    const which = byId("reject-which", HTMLFieldSetElement);
    which.hidden = choices.length < 2;
    which.replaceChildren(el("legend", { text: "Which crossing is wrong?" }), ...choices.map((text, i) => el("label", { class: "inline" }, [
      el("input", { type: "radio", name: "reject-which", value: String(i), checked: i === choices.length - 1 }), ` ${text}`,
    ])));
    this.form.hidden = false;
    this.reason.focus();
  }

  submit() {
    const answer = this.answer;
    const reason = this.reason.value;
    const chosen = this.form.querySelector("input[name=reject-which]:checked");
    this.closeForm();
    if (answer) answer(reason, chosen instanceof HTMLInputElement ? Number(chosen.value) : 0);
  }

  closeForm() {
    const had = this.form.contains(document.activeElement);
    this.answer = null;
    this.form.hidden = true;
    // The keys go on working: the focus returns to the page, not to a field that went away.
    if (had) this.root.focus();
  }

  /** @param {string} text a note under the buttons ("" to clear) */
  say(text) {
    this.note.textContent = text;
    this.noteFor = text ? { focus: focusKey(this.store.focus), edits: this.store.work.edits.length } : null;
  }
}

/**
 * What a focus is about, as text: the same moment, event or tracks give the same key (the focus
 * object itself is made anew when the counts come back).
 * @param {import("./store.js").Focus | null} focus
 */
function focusKey(focus) {
  if (!focus) return "";
  const e = focus.event;
  return JSON.stringify([focus.doubt ? focus.doubt.key : null, e ? [e.kind, e.name, e.track, e.frame] : null, focus.tracks]);
}
