// @ts-check
// Keeps the core's plan the page's: every change of the plan goes to the worker (edits after a short
// pause, so typing does not send each key), where the core checks every field and, when there are
// tracks, counts again at once.

import { planForCore } from "./plan.js";
import { Cancelled } from "./protocol.js";
import { withoutDocs } from "./messages.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./core-client.js").CoreClient} CoreClient */

export class PlanSync {
  /**
   * @param {PageStore} store
   * @param {CoreClient} client
   */
  constructor(store, client) {
    this.store = store;
    this.client = client;
    /** @type {ReturnType<typeof setTimeout> | undefined} */
    this.timer = undefined;
    /** How many times the plan has been sent (the answers of the last only are taken). */
    this.sendings = 0;
    store.subscribe(["plan"], ({ why }) => {
      clearTimeout(this.timer);
      this.timer = setTimeout(() => this.send(), why === "edit" ? 120 : 0);
    });
    // Footage opened after the plan: the plan is checked against its picture too. And the count
    // reaches to the end of the footage the work is on, once its fingerprint has its duration
    // (detections from a file end at their last box).
    store.subscribe(["video", "prints"], () => this.send());
    /** The latest sending, until its answer is taken. */
    this.current = Promise.resolve();
  }

  /**
   * Gives the plan to the core now, a change still waiting for its pause with it, and resolves once
   * the latest sending has its answer: the counts on the page are then the last plan's. (Run's own
   * sending could be overtaken by an edit's, made just before Run was pressed; Run then looked for
   * counts that were still on their way, and left the person on Set up: a test that typed an
   * interval and pressed Run at once, on a busy machine.)
   */
  async sendSettled() {
    clearTimeout(this.timer);
    let sending = this.send();
    while (true) {
      await sending;
      if (sending === this.current) return;
      sending = this.current;
    }
  }

  /** Gives the plan to the core now; the counts it gives back, if any, become the page's. */
  send() {
    this.current = this.sendOnce();
    return this.current;
  }

  async sendOnce() {
    // Each sending is numbered: an answer about an earlier plan, arriving after a later sending
    // (two round trips each), is dropped rather than put over the later one's.
    const sending = ++this.sendings;
    const latest = () => sending === this.sendings;
    const { json, calibrationNote } = planForCore(this.store.plan);
    this.store.planChecked(calibrationNote);
    try {
      // The footage the project saved here will name (the one open, else the one the work was
      // made with), and the very duration it records: `throughline run --edits PROJECT` counts
      // to the same end.
      const print = this.store.prints.footage || this.store.work.madeWith.footage;
      const seconds = (print && print.duration_seconds) || 0;
      const results = await this.client.setPlan(json, this.store.picture, seconds);
      if (!latest()) return;
      // Detections set aside (the demo's, under the person's own footage) leave tracks in the
      // worker until others come: they are not the person's counts.
      if (results && this.store.detections) this.store.resultsReady(results);
      const video = this.store.video;
      if (video.playable) {
        const outside = await this.client.planOutsidePicture(video);
        if (outside.length && latest()) {
          const which = outside.join(", ");
          const lie = outside.length === 1 ? "lies" : "lie";
          const note = `${which} ${lie} wholly outside the picture (${video.width} × ${video.height}): nothing is counted there. Was this plan drawn for other footage?`;
          this.store.planChecked([calibrationNote, note].filter(Boolean).join("\n"));
        }
      }
    } catch (e) {
      // A worker replaced on Cancel drops the plan it was given; it gets it again.
      if (e instanceof Cancelled || !latest()) return;
      // The core read the page's own copy of the plan: its lines and columns are not the file's.
      const why = withoutDocs(/** @type {Error} */ (e).message).replace(/^line \d+, column \d+: /, "");
      this.store.planChecked(`The plan needs a fix: ${why}` + (calibrationNote ? `\n${calibrationNote}` : ""), true);
    }
  }
}
