// @ts-check
// The review's work beside the plan: the person's corrections (in the order made), their decisions
// on the doubtful moments, the site's name, and what the footage and detections were when the work
// was made (their fingerprints). Undo and Redo step through it (corrections, decisions and hand
// counts; the site's name and files too where a step replaced the whole work: Clear work, a project
// opened); every change is kept in the browser's storage, so a reload brings it back. Only the page
// store (store.js) holds one.

/** @typedef {import("./edits.js").Edit} Edit */
/** A decision on a doubtful moment: the count stands, or it was wrong. @typedef {"accepted" | "rejected"} Decision */
/** @typedef {import("./protocol.js").Fingerprint} Fingerprint */
/** The footage and detections a piece of work was made with. @typedef {{footage: Fingerprint | null, detections: Fingerprint | null}} Prints */
/** What a project file holds beside the corrections: hand counts and a chosen correction factor (hand-count.js changes them). @typedef {{tallies?: import("./tally.js").Tally[], correction?: import("./tally.js").Correction}} Extras */
/**
 * The parts of the work that Undo brings back: the site's name and files only from before a step
 * that replaced the whole work (a name typed is not a step of its own).
 * @typedef {{edits: Edit[], links: (string | null)[], marks: [string, Decision][], extras: Extras, site?: string, madeWith?: Prints}} Snapshot
 */

const STORAGE_KEY = "throughline.review.v1";
const UNDO_DEPTH = 200;

export class ReviewWork {
  /** @param {Storage} storage */
  constructor(storage) {
    this.storage = storage;
    /** @type {Edit[]} in the order made */
    this.edits = [];
    /** @type {(string | null)[]} for each correction, the doubtful moment decided with it (its key), if any */
    this.links = [];
    /** @type {Map<string, Decision>} decisions by the doubtful moment's key */
    this.marks = new Map();
    this.site = "";
    /** @type {Prints} */
    this.madeWith = { footage: null, detections: null };
    /** @type {Extras} */
    this.extras = {};
    /** What a project file holds of the work as last saved or opened here (`projectState`), or "" */
    this.savedAs = "";
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
      this.links = linksFor(this.edits, saved.links);
      this.marks = new Map(Array.isArray(saved.marks) ? saved.marks : []);
      this.site = typeof saved.site === "string" ? saved.site : "";
      this.madeWith = { footage: null, detections: null, ...(saved.madeWith || {}) };
      this.extras = saved.extras || {};
      this.savedAs = typeof saved.savedAs === "string" ? saved.savedAs : "";
      return this.edits.length > 0 || this.marks.size > 0 || Boolean(this.extras.tallies || this.extras.correction);
    } catch (e) {
      // Storage unreadable (private mode, a hand edit): start afresh rather than fail.
      return false;
    }
  }

  save() {
    const { edits, links, site, madeWith, extras, savedAs } = this;
    try {
      this.storage.setItem(STORAGE_KEY, JSON.stringify({ edits, links, marks: [...this.marks], site, madeWith, extras, savedAs }));
    } catch (e) {
      // Storage full or disabled: the work still counts in this tab; Save project keeps it as a file.
    }
  }

  /**
   * @param {boolean} whole whether the site's name and files are part of it
   * @returns {string}
   */
  snapshot(whole) {
    /** @type {Snapshot} */
    const s = { edits: this.edits, links: this.links, marks: [...this.marks], extras: this.extras };
    if (whole) Object.assign(s, { site: this.site, madeWith: this.madeWith });
    return JSON.stringify(s);
  }

  /** @param {Snapshot} s */
  bringBack(s) {
    this.edits = s.edits;
    this.links = linksFor(s.edits, s.links);
    this.marks = new Map(s.marks);
    this.extras = s.extras || {};
    if (s.site !== undefined) this.site = s.site;
    if (s.madeWith) this.madeWith = s.madeWith;
  }

  /**
   * One undoable step: `change` alters the corrections, decisions or hand counts (and, when
   * `whole`, the site's name and files); what was undone before is forgotten.
   * @param {(work: ReviewWork) => void} change
   * @param {boolean} [whole]
   */
  change(change, whole = false) {
    this.undoStack.push(this.snapshot(whole));
    if (this.undoStack.length > UNDO_DEPTH) this.undoStack.shift();
    this.redoStack = [];
    this.edits = [...this.edits];
    this.links = [...this.links];
    this.marks = new Map(this.marks);
    change(this);
    this.save();
  }

  /** Takes back the last step; false when there is none. */
  undo() {
    return this.step(this.undoStack, this.redoStack);
  }

  /** Does again the last step undone; false when there is none. */
  redo() {
    return this.step(this.redoStack, this.undoStack);
  }

  /**
   * @param {string[]} from the stack whose last state comes back
   * @param {string[]} to the stack the state now goes on
   */
  step(from, to) {
    const state = from.pop();
    if (!state) return false;
    /** @type {Snapshot} */
    const s = JSON.parse(state);
    to.push(this.snapshot(s.site !== undefined));
    this.bringBack(s);
    this.save();
    return true;
  }

  /**
   * The work of a project file, or none (Clear work), replaces this one: one undoable step, the
   * site's name and files with it.
   * @param {{edits: Edit[], marks: [string, Decision][], site: string, madeWith: Prints, extras: Extras}} work
   */
  replace(work) {
    this.change((w) => {
      w.edits = work.edits;
      w.links = work.edits.map(() => null);
      w.marks = new Map(work.marks);
      w.site = work.site;
      w.madeWith = work.madeWith;
      w.extras = work.extras;
    }, true);
  }
}

/**
 * The links kept beside the corrections, when there is one for each (an older page's storage has
 * none): else none.
 * @param {Edit[]} edits
 * @param {unknown} links
 * @returns {(string | null)[]}
 */
function linksFor(edits, links) {
  return Array.isArray(links) && links.length === edits.length ? links : edits.map(() => null);
}
