// The counting plan as the page edits it: the same shape as the plan file (docs/plan-format.md), with
// ground points allowed to be unfinished while the user types. Every change goes through `change`, so
// it can be undone and is kept in the browser's storage.

const STORAGE_KEY = "throughline.work.v1";
const UNDO_DEPTH = 100;

export function emptyPlan(frameRate = 25) {
  return { frame_rate: frameRate, interval_minutes: 15, anchor: "bottom", screenlines: [], zones: [] };
}

/** Reads a plan file's text far enough to edit it; the core checks every field when it is used. */
export function parsePlanText(text, fileName) {
  let value;
  try {
    value = JSON.parse(text);
  } catch (e) {
    throw new Error(`${fileName} is not valid JSON (${e.message}). A plan is a JSON object with "frame_rate" and "screenlines"; see docs/plan-format.md.`);
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
 * The plan as the core should see it. Ground points join the plan only when there are 4 or more and
 * every one has both ground coordinates; until then the reason comes back in `calibrationNote`.
 */
export function planForEngine(plan) {
  const out = { ...plan };
  let calibrationNote = "";
  const pairs = plan.calibration ? plan.calibration.pairs || [] : [];
  if (pairs.length > 0) {
    const complete = pairs.every((p) => p.ground && p.ground.every((v) => typeof v === "number" && Number.isFinite(v)));
    if (!complete) {
      calibrationNote = "Speeds wait for the ground position (X, Y) of every ground point.";
      delete out.calibration;
    } else if (pairs.length < 4) {
      calibrationNote = `Speeds need 4 or more ground points (${pairs.length} so far).`;
      delete out.calibration;
    }
  } else {
    delete out.calibration;
  }
  return { json: JSON.stringify(out, null, 2) + "\n", calibrationNote };
}

export function hasCountingGeometry(plan) {
  return plan.screenlines.length > 0 || plan.zones.length > 0;
}

/** A name not yet used by any line or zone: "line 1", "line 2", ... */
export function freshName(plan, stem) {
  const used = new Set([...plan.screenlines, ...plan.zones].map((x) => x.name));
  for (let i = 1; ; i++) if (!used.has(`${stem} ${i}`)) return `${stem} ${i}`;
}

/** Holds the current plan, its undo history and its storage. `onChange(plan, why)` after every change. */
export class PlanStore {
  constructor(storage, onChange) {
    this.storage = storage;
    this.onChange = onChange;
    this.history = [];
    this.plan = emptyPlan();
    this.source = "demo";
    this.settings = { method: "" };
  }

  /** The saved work from an earlier visit, or null. */
  restore() {
    try {
      const saved = JSON.parse(this.storage.getItem(STORAGE_KEY) || "null");
      if (saved && saved.plan) {
        this.plan = parsePlanText(JSON.stringify(saved.plan), "saved plan");
        this.source = saved.source || "saved";
        this.settings = { ...this.settings, ...(saved.settings || {}) };
        return saved;
      }
    } catch (e) {
      // Storage unreadable (private mode, quota, a hand edit): start afresh rather than fail.
    }
    return null;
  }

  save() {
    try {
      this.storage.setItem(STORAGE_KEY, JSON.stringify({ plan: this.plan, source: this.source, settings: this.settings }));
    } catch (e) {
      // Storage full or disabled: the plan still works in this tab; "Save plan" keeps it as a file.
    }
  }

  /** Applies `edit(planCopy)`; the old plan goes on the undo list. */
  change(edit, why = "edit") {
    this.history.push(JSON.stringify(this.plan));
    if (this.history.length > UNDO_DEPTH) this.history.shift();
    const next = structuredClone(this.plan);
    edit(next);
    this.plan = next;
    if (why !== "demo") this.source = why === "file" ? "file" : this.source === "demo" ? "demo-edited" : this.source;
    this.save();
    this.onChange(this.plan, why);
  }

  /** Replaces the whole plan (a file, the demo); undo brings the old one back. */
  replace(plan, why) {
    this.change((p) => {
      for (const k of Object.keys(p)) delete p[k];
      Object.assign(p, structuredClone(plan));
    }, why);
    this.source = why;
    this.save();
  }

  undo() {
    const last = this.history.pop();
    if (!last) return false;
    this.plan = JSON.parse(last);
    this.save();
    this.onChange(this.plan, "undo");
    return true;
  }

  setSetting(key, value) {
    this.settings[key] = value;
    this.save();
  }
}
