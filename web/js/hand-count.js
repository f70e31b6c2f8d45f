// @ts-check
// The hand counts' part of the page store: the tally under way (kept in the browser's storage at
// each press, so a reload or a closed tab goes on with it), the
// tallies finished (kept with the review's work, so in the browser's storage and the project file)
// and the correction factor the person chose, if any. It changes only through the named actions
// below, each telling the store's views what changed ("tally": a tally started or ended;
// "tallyPress": a press made or taken back; "checks": the tallies kept or the factor changed, so
// the core counts again with them). Keeping, deleting and the factor are steps of the review's Undo.

/** @typedef {import("./tally.js").Tally} Tally */
/** @typedef {import("./tally.js").TallyRun} TallyRun */
/** @typedef {import("./tally.js").Press} Press */
/** @typedef {import("./tally.js").Correction} Correction */
/** @typedef {import("./work.js").ReviewWork} ReviewWork */
/** @typedef {(topics: import("./store.js").Topic[]) => void} Emit */

const RUN_KEY = "throughline.tally-run.v1";

export class HandCount {
  /**
   * @param {ReviewWork} work where the finished tallies and the factor are kept
   * @param {Emit} emit tells the store's views
   */
  constructor(work, emit) {
    this.work = work;
    this.emit = emit;
    /** @type {TallyRun | null} the tally under way */
    this.run = null;
  }

  /** Goes on with the tally that was under way when the page was last closed; true when there was one. */
  resume() {
    try {
      const kept = JSON.parse(this.work.storage.getItem(RUN_KEY) || "null");
      if (!kept || !kept.tally || !Array.isArray(kept.tally.presses) || !Array.isArray(kept.keys)) return false;
      this.run = kept;
      this.emit(["tally"]);
      return true;
    } catch (e) {
      return false; // unreadable (a hand edit): nothing to go on with
    }
  }

  /** The tally under way, kept in storage (or forgotten there when there is none). */
  keepRun() {
    try {
      if (this.run) this.work.storage.setItem(RUN_KEY, JSON.stringify(this.run));
      else this.work.storage.removeItem(RUN_KEY);
    } catch (e) {
      // Storage full or disabled: the tally still runs in this tab.
    }
  }

  /** The tallies finished, in the order made. @returns {Tally[]} */
  get tallies() {
    return this.work.extras.tallies || [];
  }

  /** The correction factor chosen, or null. @returns {Correction | null} */
  get correction() {
    return this.work.extras.correction || null;
  }

  /** @param {TallyRun} run a new tally, with no presses yet */
  tallyStarted(run) {
    this.run = run;
    this.keepRun();
    this.emit(["tally"]);
  }

  /** @param {Press} press a crossing seen */
  tallyPressed(press) {
    if (!this.run) return;
    this.run.tally.presses.push(press);
    this.keepRun();
    this.emit(["tallyPress"]);
  }

  /** Takes back the last press; returns it, or null when there was none. */
  tallyPressUndone() {
    const last = this.run ? this.run.tally.presses.pop() : undefined;
    if (!last) return null;
    this.keepRun();
    this.emit(["tallyPress"]);
    return last;
  }

  /** The tally under way is finished: it is kept, and the core compares it. */
  tallyFinished() {
    if (!this.run) return;
    this.keep([...this.tallies, this.run.tally], this.correction);
    this.run = null;
    this.keepRun();
    this.emit(["tally", "checks"]);
  }

  /** The tally under way is dropped, unkept. */
  tallyDropped() {
    this.run = null;
    this.keepRun();
    this.emit(["tally"]);
  }

  /** @param {number} index a kept tally, deleted */
  tallyDeleted(index) {
    this.keep(this.tallies.filter((_, i) => i !== index), this.correction);
    this.emit(["checks"]);
  }

  /**
   * A tally deleted is brought back where it was.
   * @param {number} index
   * @param {Tally} tally
   */
  tallyRestored(index, tally) {
    const tallies = [...this.tallies];
    tallies.splice(index, 0, tally);
    this.keep(tallies, this.correction);
    this.emit(["checks"]);
  }

  /** @param {Correction | null} correction the factor chosen, or none */
  correctionChosen(correction) {
    this.keep(this.tallies, correction);
    this.emit(["checks"]);
  }

  /**
   * @param {Tally[]} tallies
   * @param {Correction | null} correction
   */
  keep(tallies, correction) {
    /** @type {import("./work.js").Extras} */
    const extras = {};
    if (tallies.length) extras.tallies = tallies;
    if (correction) extras.correction = correction;
    this.work.change((w) => { w.extras = extras; });
  }
}
