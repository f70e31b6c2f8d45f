// @ts-check
// Keeps the core's corrections the page's: every change of the corrections (a new edit, Undo,
// Redo, a project opened) goes to the worker, where the core applies them and counts again at once;
// the edited tracks and the new counts come back. A project's hand counts and correction factor go
// with them, as a project file, so the counts are those `throughline run --edits project.json` gives.

import { editsFileText } from "./edits.js";
import { planForCore } from "./plan.js";
import { TrackView } from "./tracks.js";
import { Cancelled } from "./protocol.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./core-client.js").CoreClient} CoreClient */
/** @typedef {import("./messages.js").Messages} Messages */

export class EditSync {
  /**
   * @param {PageStore} store
   * @param {CoreClient} client
   * @param {Messages} messages
   */
  constructor(store, client, messages) {
    this.store = store;
    this.client = client;
    this.messages = messages;
    /** Whether the core was last given a project file (its hand counts must then be cleared by another). */
    this.sentProject = false;
    store.subscribe(["edits", "checks"], () => this.send());
    store.subscribe(["results"], () => this.sayNotApplied());
  }

  /** Gives the corrections to the core now; the tracks and counts it gives back become the page's. */
  async send() {
    const { json, kind } = this.workText();
    try {
      const out = await this.client.setEdits(json, kind, this.store.picture);
      if (out.tracks) this.store.tracksReady(new TrackView(out.tracks.boxes, out.tracks.trackList));
      if (out.results && this.store.detections) this.store.resultsReady(out.results);
    } catch (e) {
      if (e instanceof Cancelled) return; // a worker replaced on Cancel is given them again
      this.messages.say("edits", "error", `The corrections could not be applied: ${/** @type {Error} */ (e).message}`);
    }
  }

  /**
   * The corrections as the core takes them: an edits file, or (when there are hand counts or a
   * correction factor, or were at the last send) a project file holding them too.
   * @returns {{json: string, kind: "edits" | "project"}}
   */
  workText() {
    const work = this.store.work;
    const { tallies, correction } = work.extras;
    const wanted = Boolean(tallies || correction);
    if (!wanted && !this.sentProject) return { json: editsFileText(work.edits), kind: "edits" };
    this.sentProject = wanted;
    const plan = JSON.parse(planForCore(this.store.plan).json);
    const project = { format: "throughline-project", version: 1, plan, edits: work.edits, tallies: tallies || [], correction };
    return { json: JSON.stringify(project), kind: "project" };
  }

  /** A message when some corrections do not fit the tracks counted now. */
  sayNotApplied() {
    const outcomes = this.store.results ? this.store.results.report.edits || [] : [];
    const missed = outcomes.filter((o) => !o.applied).length;
    if (!missed) return this.messages.clear("edits-missed");
    this.messages.say("edits-missed", "warn", `${missed} of ${outcomes.length} corrections could not be applied to these tracks (Review, Edits says why for each). Were they made on other detections, or with another tracking method?`);
  }
}
