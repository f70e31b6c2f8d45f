// @ts-check
// The page's state in one place. It changes only through the named actions below; each action says
// which topics it changed, and every view subscribed to one of them is told once, at once. Views
// then update the parts of the page they own. Nothing here touches the page or the worker.

import { PlanHistory, frameRateOf } from "./plan.js";
import { LiveCounts } from "./live-counts.js";
import { KeyColours } from "./palette.js";
import { ReviewWork } from "./work.js";
import { editsFileText } from "./edits.js";
import { HandCount } from "./hand-count.js";

/** @typedef {import("./plan.js").Plan} Plan */
/** @typedef {import("./plan.js").PlanChange} PlanChange */
/** @typedef {import("./geometry.js").Point} Point */
/** @typedef {import("./protocol.js").DetectionSummary} DetectionSummary */
/** @typedef {import("./tracks.js").TrackView} TrackView */
/** @typedef {import("./protocol.js").Doubt} Doubt */
/** @typedef {import("./edits.js").Edit} Edit */
/** @typedef {import("./work.js").Decision} Decision */
/** @typedef {import("./protocol.js").Fingerprint} Fingerprint */

/**
 * What an action changed. "geometry": plan points moved in place while dragging (drawing only).
 * @typedef {"plan" | "geometry" | "selection" | "frame" | "footage" | "video" | "picture" | "detections"
 *   | "tracks" | "results" | "busy" | "planProblem" | "planName" | "frameRate" | "tool" | "draft" | "view"
 *   | "reviewTab" | "focus" | "edits" | "marks" | "site" | "prints" | "method" | "tally" | "tallyPress" | "checks" | "saved"
 *   | "detector"} Topic
 */
/** @typedef {{changed: Set<Topic>, why: string}} Change `why`: for "plan", a PlanChange */
/** @typedef {(change: Change) => void} Listener */

/**
 * The footage as the video element plays it: `frames` at the plan's frame rate when it opened.
 * `duration`: seconds, as the video element says.
 * @typedef {{playable: boolean, width: number, height: number, duration: number}} Video
 */
/**
 * Detections in use: the core's summary, the file (to give a restarted worker), how to name them,
 * the file's name ("" for detections found in footage here), and what finding them in the
 * footage said of it (frames missing, filled), for the hand-in files.
 * @typedef {{summary: DetectionSummary, source: Blob, label: string, name: string, notes?: string[]}} Detections
 */
/** @typedef {{report: import("./results.js").Report, reportText: string, csv: string, live: LiveCounts}} Results */
/** What the person is doing: setting up, reviewing against the footage, reading the results. @typedef {"setup" | "review" | "results"} View */
/** The review's lists. @typedef {"doubtful" | "tracks" | "events" | "edits" | "tally"} ReviewTab */
/**
 * The tracks being reviewed (tracker ids), the count event chosen, if one was, and the doubtful
 * moment chosen, if one was.
 * @typedef {{tracks: number[], event: import("./results.js").CountEvent | null, doubt?: Doubt | null}} Focus
 */
/** @typedef {"select" | "line" | "zone" | "calibration"} Tool */
/** A line or zone being drawn: its points so far and where the pointer is. @typedef {{kind: "line" | "zone", points: Point[], cursor?: Point}} Draft */
/** A vertex being dragged: of a line, a zone or a ground point. @typedef {{kind: "line" | "zone" | "ground", index: number, vertex: number}} Vertex */

export class PageStore {
  /** @param {Storage} storage where the plan and settings are kept between visits */
  constructor(storage) {
    this.plans = new PlanHistory(storage);
    /** The plan and settings kept from an earlier visit, if any (they are now the current ones). */
    this.restored = this.plans.restore();
    /** The frame on screen, 1-based. */
    this.frame = 1;
    /** @type {{name: string, blob: Blob} | null} the footage opened, as a file */
    this.footage = null;
    /** @type {{name: string, blob: Blob} | null} the footage that played before it, while it is opening */
    this.footageBefore = null;
    /** @type {Video} */
    this.video = { playable: false, width: 0, height: 0, duration: 0 };
    /** @type {{width: number, height: number} | null} the picture's size in video pixels, once known */
    this.picture = null;
    /** @type {Detections | null} */
    this.detections = null;
    /** @type {TrackView | null} */
    this.tracks = null;
    /** @type {import("./protocol.js").Bridged} what bridging missed detections did to the tracks shown */
    this.bridged = null;
    /** @type {{name: string, blob: Blob} | null} the footage open when `bridged` was made (other footage may be open now) */
    this.bridgedWith = null;
    /** @type {Results | null} */
    this.results = null;
    /** @type {Doubt[]} the doubtful moments of the latest count, most doubtful first */
    this.doubts = [];
    /** The corrections and review decisions, kept from an earlier visit when there were any. */
    this.work = new ReviewWork(storage);
    this.workRestored = this.work.restore();
    /** The hand counts: the tally under way, those kept, the correction factor chosen (hand-count.js). */
    this.handCount = new HandCount(this.work, (topics) => this.emit(topics));
    /** @type {{footage: Fingerprint | null, detections: Fingerprint | null}} the files open now */
    this.prints = { footage: null, detections: null };
    /** @type {string | null} the selected line or zone: "line:2", "zone:0" */
    this.selected = null;
    /** Where the plan came from, as the Files panel names it. */
    this.planName = this.restored ? restoredPlanName(this.restored.source) : "drawn here";
    /** What keeps the plan from being used in full (a field to fix, unfinished ground points), or "". */
    this.planProblem = "";
    /** The core refused the plan as it now is: the counts shown are of the last plan it took. */
    this.planRefused = false;
    this.finding = false;
    this.tracking = false;
    /** @type {{rate: number, how: string} | null} the footage's own frame rate, where measured */
    this.measuredRate = null;
    /** @type {Tool} the drawing tool in use on the picture */
    this.tool = "select";
    /** @type {Draft | null} the line or zone being drawn */
    this.draft = null;
    /** @type {View} */
    this.view = "setup";
    /** @type {ReviewTab} */
    this.reviewTab = "doubtful";
    /** @type {Focus | null} */
    this.focus = null;
    /** Each line's and zone's key colour, kept by name. */
    this.keyColours = new KeyColours(storage);
    /** @type {Map<Listener, Set<Topic>>} */
    this.listeners = new Map();
  }

  get plan() {
    return this.plans.plan;
  }

  get settings() {
    return this.plans.settings;
  }

  /** The plan's frame rate (25 where it has none). */
  get fps() {
    return frameRateOf(this.plan);
  }

  /** The footage's frames at the plan's frame rate (which the person may correct), or 0. */
  get videoFrames() {
    return this.video.playable ? Math.round(this.video.duration * this.fps) : 0;
  }

  /** The last frame there is anything to show for: the footage's or the detections'. */
  get lastFrame() {
    return Math.max(1, this.videoFrames, this.detections ? this.detections.summary.frames : 0);
  }

  /**
   * Calls `listener` after every action that changes one of `topics`. Returns the unsubscribe.
   * @param {Topic[]} topics
   * @param {Listener} listener
   */
  subscribe(topics, listener) {
    this.listeners.set(listener, new Set(topics));
    return () => this.listeners.delete(listener);
  }

  /**
   * @param {Topic[]} topics
   * @param {string} [why]
   */
  emit(topics, why = "") {
    const changed = new Set(topics);
    for (const [listener, wanted] of [...this.listeners]) {
      if (topics.some((t) => wanted.has(t))) listener({ changed, why });
    }
  }

  // ------------------------------------------------------------ files and what they hold

  /**
   * @param {string} name
   * @param {Blob} blob
   */
  footageOpened(name, blob) {
    // The footage that played until now, to go back to if this one does not play.
    this.footageBefore = this.video.playable ? this.footage : null;
    this.footage = { name, blob };
    this.video = { playable: false, width: 0, height: 0, duration: 0 }; // until videoReady
    this.emit(["footage"]);
  }

  /**
   * The video element has the footage's size and length.
   * @param {number} width
   * @param {number} height
   * @param {number} duration seconds
   */
  videoReady(width, height, duration) {
    this.video = { playable: true, width, height, duration };
    this.picture = { width, height };
    this.emit(["video", "picture"]);
  }

  videoFailed() {
    this.video = { ...this.video, playable: false };
    this.emit(["video"]);
  }

  /**
   * The picture's size when there is no footage to give it (from the detections' extent).
   * @param {number} width
   * @param {number} height
   */
  pictureSized(width, height) {
    this.picture = { width, height };
    this.emit(["picture"]);
  }

  /**
   * New detections are in the worker (opened or found in footage); tracks and counts of the old
   * ones are gone.
   * @param {DetectionSummary} summary
   * @param {Blob} source the detections as a file
   * @param {string} label how the Files panel names them
   * @param {string} name the file's name ("" when found in footage)
   * @param {string[]} [notes] what finding them in the footage said of it
   */
  detectionsLoaded(summary, source, label, name, notes = []) {
    this.detections = { summary, source, label, name, notes };
    this.emit(["detections", ...this.forgetTracking()]);
  }

  /** The detections in use cannot belong to the footage open (the demo's, under the person's own). */
  detectionsSetAside() {
    this.detections = null;
    this.emit(["detections", ...this.forgetTracking()]);
  }

  // ------------------------------------------------------------ tracking and counts

  /**
   * @param {TrackView} tracks
   * @param {import("./protocol.js").Bridged} [bridged] for a new run's tracks, what bridging with the
   *   footage did (null: it did not run); left out for the same run's tracks after corrections
   */
  tracksReady(tracks, bridged) {
    this.tracks = tracks;
    if (bridged !== undefined) [this.bridged, this.bridgedWith] = [bridged, this.footage];
    this.emit(["tracks"]);
  }

  /** @param {import("./protocol.js").Results} results the report (JSON text), the counts CSV and the doubtful moments */
  resultsReady({ report, csv, doubts }) {
    const parsed = JSON.parse(report);
    this.results = { report: parsed, reportText: report, csv, live: new LiveCounts(parsed) };
    this.doubts = doubts;
    // The event in focus, if any, is the same event in the new counts (or none, when it is gone);
    // a doubtful moment in focus stays in focus, as the new queue has it when it is still there.
    if (this.focus) {
      const { event, doubt } = this.focus;
      const same = event ? parsed.events.find((/** @type {import("./results.js").CountEvent} */ e) => e.frame === event.frame && e.name === event.name && e.direction === event.direction && e.track === event.track) : null;
      const kept = doubt ? doubts.find((d) => d.key === doubt.key) || doubt : null;
      this.focus = { ...this.focus, event: same || null, doubt: kept };
    }
    this.emit(["results", "focus"]);
  }

  /** Tracking was stopped: the detections and plan stay, tracks and counts go. */
  trackingCancelled() {
    this.emit(this.forgetTracking());
  }

  /**
   * The one reset: forgets the tracks and everything counted from them. Returns the topics changed.
   * @returns {Topic[]}
   */
  forgetTracking() {
    this.tracks = null;
    this.bridged = null;
    this.results = null;
    this.doubts = [];
    this.focus = null;
    return ["tracks", "results", "focus"];
  }

  /** @param {boolean} on */
  findingChanged(on) {
    this.finding = on;
    this.emit(["busy"]);
  }

  /** @param {boolean} on */
  trackingChanged(on) {
    this.tracking = on;
    this.emit(["busy"]);
  }

  /**
   * The footage's own frame rate was measured (nothing happens when `rate` is no rate).
   * @param {number | null} rate frames a second
   * @param {string} how "plays at" or "is coded at"
   */
  frameRateMeasured(rate, how) {
    if (rate === null || !(rate > 0 && Number.isFinite(rate))) return;
    this.measuredRate = { rate, how };
    this.emit(["frameRate"]);
  }

  // ------------------------------------------------------------ what is on screen

  /** @param {number} f a frame number; kept within 1 and the last frame */
  frameChosen(f) {
    this.frame = Math.max(1, Math.min(this.lastFrame, Math.round(f)));
    this.emit(["frame"]);
  }

  /**
   * The frame the footage is showing while it plays (not limited to the last frame, as it was measured).
   * @param {number} f
   */
  framePlayed(f) {
    this.frame = Math.max(1, f);
    this.emit(["frame"]);
  }

  /** @param {View} view */
  viewChosen(view) {
    this.view = view;
    this.emit(["view"]);
  }

  /** @param {ReviewTab} tab */
  reviewTabChosen(tab) {
    this.reviewTab = tab;
    this.emit(["reviewTab"]);
  }

  /**
   * Tracks chosen for review (their marks stand out, the others are dimmed), or none (null).
   * @param {Focus | null} focus
   */
  focusChosen(focus) {
    this.focus = focus;
    this.emit(["focus"]);
  }

  /** @param {string | null} key "line:2", "zone:0" or null */
  itemSelected(key) {
    this.selected = key;
    this.emit(["selection"]);
  }

  /**
   * A drawing tool was chosen; anything half drawn is dropped.
   * @param {Tool} tool
   */
  toolChosen(tool) {
    this.tool = tool;
    this.draft = null;
    this.emit(["tool", "draft"]);
  }

  /** @param {Draft | null} draft the line or zone being drawn, changed */
  draftChanged(draft) {
    this.draft = draft;
    this.emit(["draft"]);
  }

  // ------------------------------------------------------------ the plan

  /**
   * An edit of the plan (one undo step).
   * @param {(plan: Plan) => void} edit changes the copy it is given
   */
  planEdited(edit) {
    const before = this.plan;
    this.plans.change(edit, "edit");
    this.keyColours.follow(before, this.plan);
    this.emit(["plan"], "edit");
  }

  /**
   * A whole new plan: a file, the demo's, or a new empty one. Undo brings the old one back.
   * @param {Plan} plan
   * @param {"file" | "demo" | "new"} why
   * @param {string} name how the Files panel names it
   */
  planReplaced(plan, why, name) {
    this.plans.replace(plan, why, name);
    this.planName = name;
    this.emit(["plan", "planName"], why);
  }

  planUndone() {
    const before = this.plan;
    if (!this.plans.undo()) return;
    this.keyColours.follow(before, this.plan);
    // The Files panel names the plan brought back (it named the file undone).
    const { source, file } = this.plans;
    this.planName = file ? file.name : source === "demo" ? "demo plan.json" : source === "demo-edited" ? "demo plan.json (edited)" : "drawn here";
    this.emit(["plan", "planName"], "undo");
  }

  /** Deletes the selected line or zone. */
  selectedDeleted() {
    if (!this.selected) return;
    const [kind, i] = this.selected.split(":");
    this.selected = null;
    this.plans.change((p) => (kind === "line" ? p.screenlines : p.zones).splice(Number(i), 1), "edit");
    this.emit(["plan", "selection"], "edit");
  }

  /**
   * A vertex moved while being dragged: the plan changes in place, without an undo step (the drag
   * made one as it began) and without telling anything but the drawing, until `dragEnded`.
   * @param {Vertex} vertex
   * @param {Point} p
   */
  vertexDragged({ kind, index, vertex }, p) {
    const plan = this.plan;
    if (kind === "line") plan.screenlines[index].points[vertex] = p;
    else if (kind === "zone") plan.zones[index].polygon[vertex] = p;
    else if (plan.calibration) plan.calibration.pairs[index].image = p;
    this.emit(["geometry"]);
  }

  /** The drag is over: the plan is kept and everyone is told. */
  dragEnded() {
    this.plans.save();
    this.emit(["plan"], "edit");
  }

  /**
   * @param {string} problem what keeps the plan from being used in full, or ""
   * @param {boolean} [refused] the core could not take the plan at all (counts are of the one before)
   */
  planChecked(problem, refused = false) {
    this.planProblem = problem;
    this.planRefused = refused;
    this.emit(["planProblem"]);
  }

  /**
   * @param {"method" | "bridgeFrames" | "farHeight" | "nearHeight"} key
   * @param {string} value
   */
  settingChanged(key, value) {
    this.plans.setSetting(key, value);
  }

  // ------------------------------------------------------------ corrections and review decisions

  /**
   * A correction made (one undo step), with the decision on the doubtful moment it answers, if any.
   * @param {Edit} edit
   * @param {{key: string, decision: Decision} | null} [mark]
   */
  correctionMade(edit, mark = null) {
    this.work.change((w) => {
      w.edits.push(edit);
      w.links.push(mark ? mark.key : null);
      if (mark) w.marks.set(mark.key, mark.decision);
    });
    this.filesInUse();
    this.emit(["edits", "marks"]);
  }

  /**
   * A decision on a doubtful moment (one undo step).
   * @param {string} key
   * @param {Decision} decision
   */
  doubtDecided(key, decision) {
    this.work.change((w) => w.marks.set(key, decision));
    this.emit(["marks"]);
  }

  /**
   * A correction taken back from the list, with the decisions it carried out (one undo step): the
   * moment decided with it, and `marks`.
   * @param {number} index its place in the corrections
   * @param {string[]} marks other doubtful moments whose decision goes with it
   */
  correctionRemoved(index, marks) {
    this.work.change((w) => {
      w.edits.splice(index, 1);
      const [link] = w.links.splice(index, 1);
      if (link && w.marks.get(link) === "rejected") w.marks.delete(link);
      for (const key of marks) w.marks.delete(key);
    });
    this.emit(["edits", "marks"]);
  }

  correctionsUndone() {
    this.stepped(() => this.work.undo());
  }

  correctionsRedone() {
    this.stepped(() => this.work.redo());
  }

  /**
   * Undo or Redo: the views told of what it changed (the core counts again only when the
   * corrections or hand counts did).
   * @param {() => boolean} step
   */
  stepped(step) {
    const w = this.work;
    const parts = () => [editsFileText(w.edits), JSON.stringify(w.extras), w.site, JSON.stringify(w.madeWith)];
    const before = parts();
    if (!step()) return;
    const after = parts();
    /** @type {Topic[]} */
    const topics = ["marks"];
    /** @type {Topic[]} */
    const each = ["edits", "checks", "site", "prints"];
    each.forEach((topic, i) => { if (after[i] !== before[i]) topics.push(topic); });
    this.emit(topics);
  }

  /** The work is now made on the files open now (their fingerprints, where known). */
  filesInUse() {
    const { footage, detections } = this.prints;
    if (footage || detections) this.work.madeWith = { footage, detections };
    this.work.save();
  }

  /**
   * A project file opened: its plan, tracking method, corrections, decisions and site replace the
   * page's (Undo brings the plan back; Undo under Review the corrections).
   * @param {import("./protocol.js").Project} project as the core read it
   * @param {string} name the file's name
   */
  projectOpened(project, name) {
    this.plans.replace(/** @type {Plan} */ (project.plan), "file");
    const tracking = project.tracking || {};
    this.plans.setSetting("method", tracking.method || "");
    const { bridge_frames: bridge, ...others } = tracking.settings || {};
    this.plans.setSetting("bridgeFrames", bridge === undefined ? "" : String(bridge));
    // Settings the page has no field for (an older project's, to track as it did) are kept whole,
    // with the method they are for: they apply, and are saved, only while it is the one chosen.
    this.plans.setSetting("tracker", Object.keys(others).length ? JSON.stringify(others) : "");
    this.plans.setSetting("trackerFor", tracking.method || "");
    // The detector's heights it was made with, when it records them.
    const detector = project.detector || {};
    if (project.detector) {
      this.plans.setSetting("farHeight", detector.far_height === undefined ? "" : String(detector.far_height));
      this.plans.setSetting("nearHeight", detector.near_height === undefined ? "" : String(detector.near_height));
    }
    this.planName = `${name} (project)`;
    /** @type {import("./work.js").Extras} */
    const extras = {};
    if (project.tallies && project.tallies.length) extras.tallies = project.tallies;
    if (project.correction) extras.correction = project.correction;
    this.work.replace({
      edits: project.edits,
      marks: project.review.map((m) => [m.key, m.decision === "rejected" ? "rejected" : "accepted"]),
      site: project.site || "",
      madeWith: { footage: project.footage || null, detections: project.detections || null },
      extras,
    });
    this.emit(["plan", "planName", "method", "edits", "marks", "site", "checks", "detector"], "file");
  }

  /**
   * The work on the files is cleared, to begin afresh on others: corrections and decisions, hand
   * counts, the factor, the site's name and the files it was made with (one undo step, as a
   * project opened). The plan and the files open stay.
   */
  workCleared() {
    this.handCount.tallyDropped();
    this.work.replace({ edits: [], marks: [], site: "", madeWith: { footage: null, detections: null }, extras: {} });
    this.emit(["edits", "marks", "site", "checks", "prints"]);
  }

  /** @param {string} state the work as the project file just saved or opened holds it (`projectState`) */
  projectSaved(state) {
    this.work.savedAs = state;
    this.work.save();
    this.emit(["saved"]);
  }

  /** @param {string} name the site's name, for the project file and printed sheets */
  siteNamed(name) {
    this.work.site = name;
    this.work.save();
    this.emit(["site"]);
  }

  /**
   * The fingerprint of a file open now.
   * @param {"footage" | "detections"} kind
   * @param {Fingerprint | null} print
   */
  fileFingerprinted(kind, print) {
    this.prints = { ...this.prints, [kind]: print };
    this.emit(["prints"]);
  }
}

/**
 * How the Files panel names a plan kept from an earlier visit, by where it came from: a file or
 * the demo's as they were, or changed here ("demo-edited", or drawn here: "saved").
 * @param {string | undefined} source
 */
function restoredPlanName(source) {
  if (source === "file") return "kept from last time";
  if (source === "demo") return "the demo's, kept from last time";
  return "kept from last time (edited)";
}
