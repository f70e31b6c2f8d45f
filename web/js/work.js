// @ts-check
// The review's work beside the plan: the person's corrections (in the order made), their decisions
// on the doubtful moments, the site's name, and what the footage and detections were when the work
// was made (their fingerprints). Undo and Redo step through it; every change is kept in the
// browser's storage, so a reload brings it back. Only the page store (store.js) holds one.

/** @typedef {import("./edits.js").Edit} Edit */
/** A decision on a doubtful moment: the count stands, or it was wrong. @typedef {"accepted" | "rejected"} Decision */
/** @typedef {import("./protocol.js").Fingerprint} Fingerprint */
/** The footage and detections a piece of work was made with. @typedef {{footage: Fingerprint | null, detections: Fingerprint | null}} Prints */
/** What a project file holds beside the corrections: hand counts and a chosen correction factor (hand-count.js changes them). @typedef {{tallies?: import("./tally.js").Tally[], correction?: import("./tally.js").Correction}} Extras */
/** The parts of the work that Undo brings back. @typedef {{edits: Edit[], marks: [string, Decision][]}} Snapshot */

const STORAGE_KEY = "throughline.review.v1";
const UNDO_DEPTH = 200;

export class ReviewWork {
  /** @param {Storage} storage */
  constructor(storage) {
    this.storage = storage;
    /** @type {Edit[]} in the order made */
    this.edits = [];
    /** @type {Map<string, Decision>} decisions by the doubtful moment's key */
    this.marks = new Map();
    this.site = "";
    /** @type {Prints} */
    this.madeWith = { footage: null, detections: null };
    /** @type {Extras} */
    this.extras = {};
    /** @type {string[]} earlier states, as JSON, the last one most recent */
    this.undoStack = [];
    /** @type {string[]} states undone, the last one undone most recently */
    this.redoStack = [];
  }

  /** Brings back the work kept from an earlier visit; true when there was some. */
  restore() {
    try {
      const saved = JSON.parse(this.storage.getItem(STORAGE_KEY) || "null");
      if (!saved || !Array.isArray(saved.edits)) return false;
      this.edits = saved.edits;
      this.marks = new Map(Array.isArray(saved.marks) ? saved.marks : []);
      this.site = typeof saved.site === "string" ? saved.site : "";
      this.madeWith = { footage: null, detections: null, ...(saved.madeWith || {}) };
      this.extras = saved.extras || {};
      return this.edits.length > 0 || this.marks.size > 0;
    } catch (e) {
      // Storage unreadable (private mode, a hand edit): start afresh rather than fail.
      return false;
    }
  }

  save() {
    const { edits, site, madeWith, extras } = this;
    try {
      this.storage.setItem(STORAGE_KEY, JSON.stringify({ edits, marks: [...this.marks], site, madeWith, extras }));
    } catch (e) {
      // Storage full or disabled: the work still counts in this tab; Save project keeps it as a file.
    }
  }

  /** @returns {string} */
  snapshot() {
    /** @type {Snapshot} */
    const s = { edits: this.edits, marks: [...this.marks] };
    return JSON.stringify(s);
  }

  /** @param {string} json a snapshot */
  bringBack(json) {
    /** @type {Snapshot} */
    const s = JSON.parse(json);
    this.edits = s.edits;
    this.marks = new Map(s.marks);
  }

  /**
   * One undoable step: `change` alters the corrections or decisions; what was undone before is
   * forgotten.
   * @param {(work: ReviewWork) => void} change
   */
  change(change) {
    this.undoStack.push(this.snapshot());
    if (this.undoStack.length > UNDO_DEPTH) this.undoStack.shift();
    this.redoStack = [];
    this.edits = [...this.edits];
    this.marks = new Map(this.marks);
    change(this);
    this.save();
  }

  /** Takes back the last step; false when there is none. */
  undo() {
    const last = this.undoStack.pop();
    if (!last) return false;
    this.redoStack.push(this.snapshot());
    this.bringBack(last);
    this.save();
    return true;
  }

  /** Does again the last step undone; false when there is none. */
  redo() {
    const next = this.redoStack.pop();
    if (!next) return false;
    this.undoStack.push(this.snapshot());
    this.bringBack(next);
    this.save();
    return true;
  }

  /**
   * The work of a project file replaces this one (one undoable step for the corrections).
   * @param {{edits: Edit[], marks: [string, Decision][], site: string, madeWith: Prints, extras: Extras}} work
   */
  replace(work) {
    this.change((w) => {
      w.edits = work.edits;
      w.marks = new Map(work.marks);
    });
    this.site = work.site;
    this.madeWith = work.madeWith;
    this.extras = work.extras;
    this.save();
  }
}
