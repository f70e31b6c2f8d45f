// @ts-check
// The counting plan as the page edits it: the same shape as the plan file (docs/plan-format.md), with
// ground points allowed to be unfinished while the user types. Every change goes through
// `PlanHistory.change`, so it can be undone and is kept in the browser's storage.

/** @typedef {import("./geometry.js").Point} Point */
/**
 * A screenline: a polyline in video pixels; `forward` and `backward` name its two directions.
 * @typedef {{name: string, points: Point[], forward?: string, backward?: string}} Screenline
 */
/** @typedef {{name: string, polygon: Point[]}} Zone a polygon in video pixels */
/**
 * A point whose ground position is known: `image` in video pixels, `ground` in the plan's unit
 * (null while the user has not typed it yet).
 * @typedef {{image: Point, ground: (number | null)[]}} GroundPair
 */
/** @typedef {{pairs: GroundPair[], unit?: string}} Calibration */
/** @typedef {{hysteresis?: number, zone_hysteresis?: number, smooth_seconds?: number, [key: string]: unknown}} Rules */
/**
 * The plan as edited. Fields the page does not edit are kept as they came.
 * @typedef {object} Plan
 * @property {number} [frame_rate]
 * @property {string} [start] local time of frame 1, "YYYY-MM-DDThh:mm:ss"
 * @property {number} [interval_minutes]
 * @property {string} [anchor] "bottom" or "centre"
 * @property {Rules} [rules]
 * @property {Screenline[]} screenlines
 * @property {Zone[]} zones
 * @property {Calibration} [calibration]
 */
/** Why the plan changed: an edit here, a file opened, the demo's plan, a new empty one, an undo. @typedef {"edit" | "file" | "demo" | "new" | "undo"} PlanChange */
/**
 * Choices kept with the plan: the tracking method, the longest gap in the detections to bridge with
 * the footage (frames, as typed; "" or "0": off) and the detector's two heights.
 * @typedef {{method: string, bridgeFrames?: string, farHeight?: string, nearHeight?: string, tracker?: string, trackerFor?: string}} Settings
 */

const STORAGE_KEY = "throughline.work.v1";
const UNDO_DEPTH = 100;

/**
 * The tracker settings the page has no field for (an older project's) that apply with `method`:
 * a fresh object, empty unless they were kept for that method.
 * @param {Settings} settings
 * @param {string} method "" for the best for the detections
 * @returns {Record<string, unknown>}
 */
export function trackerFields(settings, method) {
  return settings.tracker && (settings.trackerFor || "") === method ? JSON.parse(settings.tracker) : {};
}

/** @returns {Plan} */
export function emptyPlan(frameRate = 25) {
  return { frame_rate: frameRate, interval_minutes: 15, anchor: "bottom", screenlines: [], zones: [] };
}

/**
 * Reads a plan file's text far enough to edit it; the core checks every field when it is used.
 * @param {string} text
 * @param {string} fileName
 * @returns {Plan}
 */
export function parsePlanText(text, fileName) {
  let value;
  try {
    value = JSON.parse(text);
  } catch (e) {
    throw new Error(`${fileName} is not valid JSON (${/** @type {Error} */ (e).message}). A plan file is written as JSON: an object with "frame_rate" and "screenlines". Save a plan from this page to see one.`);
  }
  if (!value || typeof value !== "object" || Array.isArray(value)) {
    throw new Error(`${fileName} is not a plan: expected a JSON object with "frame_rate" and "screenlines".`);
  }
  const plan = { ...value };
  plan.screenlines = Array.isArray(plan.screenlines) ? plan.screenlines : [];
  plan.zones = Array.isArray(plan.zones) ? plan.zones : [];
  return plan;
}

/**
 * What the ground points still lack, in words ("G2 needs its ground Y"), one entry per point that
 * lacks something.
 * @param {Plan} plan
 * @returns {string[]}
 */
export function groundGaps(plan) {
  const pairs = plan.calibration ? plan.calibration.pairs || [] : [];
  /** @param {unknown} v */
  const known = (v) => typeof v === "number" && Number.isFinite(v);
  return pairs.flatMap((p, i) => {
    const [x, y] = p.ground || [];
    if (known(x) && known(y)) return [];
    const missing = !known(x) && !known(y) ? "ground X and Y" : known(x) ? "ground Y" : "ground X";
    return [`G${i + 1} needs its ${missing}`];
  });
}

/**
 * Why there are no speeds, in words, or "" when the ground points are enough for them.
 * @param {Plan} plan
 */
export function speedsNote(plan) {
  const pairs = plan.calibration ? plan.calibration.pairs || [] : [];
  if (!pairs.length) return "";
  const gaps = groundGaps(plan);
  if (gaps.length) return `No speeds yet: ${gaps.join("; ")} (under Set up, Ground points).`;
  if (pairs.length < 4) return `No speeds yet: speeds need 4 or more ground points whose ground position you know; there ${pairs.length === 1 ? "is 1" : `are ${pairs.length}`}.`;
  return "";
}

/**
 * The plan as the core should see it. Ground points join the plan only when there are 4 or more and
 * every one has both ground coordinates; until then `calibrationNote` says what is missing.
 * @param {Plan} plan
 */
export function planForCore(plan) {
  const out = { ...plan };
  const calibrationNote = speedsNote(plan);
  if (calibrationNote || !(plan.calibration && (plan.calibration.pairs || []).length)) delete out.calibration;
  return { json: JSON.stringify(out, null, 2) + "\n", calibrationNote };
}

/** @param {Plan} plan */
export function hasCountingGeometry(plan) {
  return plan.screenlines.length > 0 || plan.zones.length > 0;
}

/**
 * A name not yet used by any line or zone: "line 1", "line 2", ...
 * @param {Plan} plan
 * @param {string} stem
 */
export function freshName(plan, stem) {
  const used = new Set([...plan.screenlines, ...plan.zones].map((x) => x.name));
  for (let i = 1; ; i++) if (!used.has(`${stem} ${i}`)) return `${stem} ${i}`;
}

/**
 * The plan's frame rate, or 25 where it has none (yet).
 * @param {Plan} plan
 */
export function frameRateOf(plan) {
  const f = Number(plan.frame_rate);
  return Number.isFinite(f) && f > 0 ? f : 25;
}

/**
 * Sets a line's direction label, or removes it when `text` is blank.
 * @param {Screenline} line
 * @param {"forward" | "backward"} key
 * @param {string} text
 */
export function setLabel(line, key, text) {
  const t = text.trim();
  if (t) line[key] = t;
  else delete line[key];
}

/**
 * Sets one of the plan's counting rules, or (null) leaves it to its default.
 * @param {Plan} plan
 * @param {string} key
 * @param {number | null} v
 */
export function setRule(plan, key, v) {
  const rules = { ...(plan.rules || {}) };
  if (v === null) delete rules[key];
  else rules[key] = v;
  if (Object.keys(rules).length) plan.rules = rules;
  else delete plan.rules;
}

/**
 * The plan's `rules.hysteresis` (null: the default); `zones`, when given, sets
 * `rules.zone_hysteresis` too unless the plan has its own (zone edges keep their own margin).
 * @param {Plan} plan
 * @param {number | null} v
 * @param {number} [zones]
 */
export function setHysteresis(plan, v, zones) {
  const ownZones = plan.rules?.zone_hysteresis !== undefined;
  setRule(plan, "hysteresis", v);
  if (zones !== undefined && !ownZones) setRule(plan, "zone_hysteresis", zones);
}

/**
 * The current plan, its undo history and the browser's storage of both plan and settings. Only the
 * page store (store.js) holds one; it announces the changes.
 */
export class PlanHistory {
  /** @param {Storage} storage */
  constructor(storage) {
    this.storage = storage;
    /** @type {string[]} earlier plans, as JSON, the last one most recent */
    this.history = [];
    this.plan = emptyPlan();
    /** @type {string} where the plan came from: "demo", "demo-edited", "file", "saved" */
    this.source = "demo";
    /** @type {Settings} */
    this.settings = { method: "" };
    /** @type {{name: string, json: string} | null} the plan file opened last, and its plan as read */
    this.file = null;
  }

  /** The name of the plan file opened, while the plan is still the one it holds; else null. */
  openedAs() {
    return this.file && JSON.stringify(this.plan) === this.file.json ? this.file.name : null;
  }

  /**
   * The saved work from an earlier visit (now the current plan), or null.
   * @returns {{plan: Plan, source?: string, settings?: Settings} | null}
   */
  restore() {
    try {
      const saved = JSON.parse(this.storage.getItem(STORAGE_KEY) || "null");
      if (saved && saved.plan) {
        this.plan = parsePlanText(JSON.stringify(saved.plan), "saved plan");
        this.source = saved.source || "saved";
        this.settings = { ...this.settings, ...(saved.settings || {}) };
        if (saved.file && typeof saved.file.name === "string" && typeof saved.file.json === "string") this.file = saved.file;
        return saved;
      }
    } catch (e) {
      // Storage unreadable (private mode, quota, a hand edit): start afresh rather than fail.
    }
    return null;
  }

  save() {
    try {
      this.storage.setItem(STORAGE_KEY, JSON.stringify({ plan: this.plan, source: this.source, settings: this.settings, file: this.file }));
    } catch (e) {
      // Storage full or disabled: the plan still works in this tab; "Save plan" keeps it as a file.
    }
  }

  /**
   * Applies `edit(planCopy)`; the old plan goes on the undo list.
   * @param {(plan: Plan) => void} edit
   * @param {PlanChange} [why]
   */
  change(edit, why = "edit") {
    // The plan with where it came from, so an undo brings back both (a page reloaded after undoing
    // back to the demo's plan opens the demo again).
    this.history.push(JSON.stringify({ plan: this.plan, source: this.source, file: this.file }));
    if (this.history.length > UNDO_DEPTH) this.history.shift();
    const next = structuredClone(this.plan);
    edit(next);
    this.plan = next;
    if (why !== "demo") this.source = why === "file" ? "file" : this.source === "demo" ? "demo-edited" : this.source;
    this.save();
  }

  /**
   * Replaces the whole plan (a file, the demo's, a new empty one); undo brings the old one back.
   * @param {Plan} plan
   * @param {"file" | "demo" | "new"} why
   * @param {string} [name] a plan file's name
   */
  replace(plan, why, name) {
    this.change((p) => {
      const fields = /** @type {Record<string, unknown>} */ (/** @type {unknown} */ (p));
      for (const k of Object.keys(fields)) delete fields[k];
      Object.assign(p, structuredClone(plan));
    }, why);
    this.source = why === "new" ? "saved" : why;
    this.file = why === "file" && name ? { name, json: JSON.stringify(this.plan) } : null;
    this.save();
  }

  /** Brings back the plan before the last change; false when there is none. */
  undo() {
    const last = this.history.pop();
    if (!last) return false;
    const was = JSON.parse(last);
    [this.plan, this.source, this.file] = [was.plan, was.source, was.file];
    this.save();
    return true;
  }

  /**
   * @param {"method" | "bridgeFrames" | "farHeight" | "nearHeight" | "tracker" | "trackerFor"} key
   * @param {string} value
   */
  setSetting(key, value) {
    this.settings[key] = value;
    this.save();
  }
}
