// @ts-check
// Keeping a piece of work as a file: Save project writes the plan, the tracking method, the
// corrections, the review decisions, the site's name and the fingerprints of the footage and
// detections open (name, size, duration, SHA-256 of the first MiB), in the project file the core
// reads and writes (docs/project.schema.json), the footage's with the picture's size; Open project
// brings it all back. Work opened or kept against other footage or detections than it was made
// with says so, in a message.

import { byId, download, el, showValue } from "./dom.js";
import { planForCore, trackerFields } from "./plan.js";
import { detectorFields } from "./find-panel.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./core-client.js").CoreClient} CoreClient */
/** @typedef {import("./messages.js").Messages} Messages */
/** @typedef {import("./protocol.js").Project} Project */

export class ProjectPanel {
  /**
   * @param {PageStore} store
   * @param {CoreClient} client
   * @param {Messages} messages
   */
  constructor(store, client, messages) {
    this.store = store;
    this.client = client;
    this.messages = messages;
    this.site = byId("site-name", HTMLInputElement);
    this.projectName = byId("project-name", HTMLElement);
    const input = byId("open-project", HTMLInputElement);
    input.addEventListener("change", async () => {
      const f = input.files && input.files[0];
      if (f) this.open(await f.text(), f.name);
      input.value = "";
    });
    byId("save-project", HTMLButtonElement).addEventListener("click", () => this.save());
    byId("clear-work", HTMLButtonElement).addEventListener("click", () => this.clear());
    this.site.addEventListener("change", () => store.siteNamed(this.site.value.trim()));
    store.subscribe(["site"], () => showValue(this.site, store.work.site));
    // Said once: gone as soon as there is work again (its Undo would then take that back instead).
    store.subscribe(["edits", "marks", "checks", "site"], () => {
      const { edits, marks, extras, site } = store.work;
      if (edits.length || marks.size || extras.tallies || extras.correction || site) messages.clear("work-cleared");
    });
    this.saved = byId("project-saved", HTMLElement);
    store.subscribe(["edits", "marks", "checks", "site", "plan", "method", "saved"], () => this.saySaved());
    this.saySaved();
    store.subscribe(["video"], () => this.fingerprintFootage());
    store.subscribe(["detections"], () => this.fingerprintDetections());
    store.subscribe(["prints"], () => this.check());
    this.site.value = store.work.site;
  }

  /** Clears the work (after asking, when there is any) to begin afresh on other files. */
  clear() {
    const { work } = this.store;
    const run = this.store.handCount.run;
    const some = work.edits.length || work.marks.size || work.site || (work.extras.tallies || []).length || work.extras.correction || run;
    // A hand count under way is not part of Undo's steps until finished: said before it goes.
    const running = run ? ` The hand count under way (${run.tally.presses.length} presses) is discarded too, and Undo does not bring it back: finish it first to keep it.` : "";
    if (some && !window.confirm(`Clear the corrections, decisions, hand counts and site name of this work, to begin afresh? The plan and the files stay open. Save project first to keep the work in a file.${running}`)) return;
    this.store.workCleared();
    this.projectName.textContent = "plan, corrections and decisions in one file";
    for (const key of ["project-files", "project-rules", "project-tracking", "work-kept"]) this.messages.clear(key);
    const undo = el("button", { type: "button", text: "Undo", onclick: () => { this.messages.clear("work-cleared"); this.store.correctionsUndone(); } });
    this.messages.say("work-cleared", "ok", "Work cleared: no corrections, decisions or hand counts. Undo (here, or under Review) brings all of it back, the site's name too.", [undo]);
  }

  /** Beside Save project: whether the work has changed since the project was saved (or opened). */
  saySaved() {
    const status = projectStatus(this.store);
    this.saved.textContent = status;
    this.saved.classList.toggle("unsaved", status !== "" && status !== "saved");
  }

  /** The project as a plain object, as the core writes it. */
  project() {
    const { work, prints } = this.store;
    const p = projectWork(this.store);
    const footage = prints.footage || work.madeWith.footage;
    const detections = prints.detections || work.madeWith.detections;
    if (footage) p.footage = footage;
    if (detections) p.detections = detections;
    return p;
  }

  async save() {
    // The work as it is when saved (a change while the core writes the file is not in it).
    const state = projectState(this.store);
    try {
      const text = await this.client.writeProject(this.project());
      download(projectFileName(this.store.work.site), text, "application/json");
      this.messages.clear("project");
      this.store.projectSaved(state);
    } catch (e) {
      this.messages.say("project", "error", `The project could not be saved: ${/** @type {Error} */ (e).message}. Fix the plan (under Set up), then save again.`);
    }
  }

  /**
   * Opens a project file: its plan, method, corrections, decisions and site replace the page's.
   * @param {string} text
   * @param {string} name
   */
  async open(text, name) {
    let project;
    let age;
    try {
      ({ project, age } = await this.client.readProject(text));
    } catch (e) {
      this.messages.say("project", "error", `${name} could not be opened as a project: ${/** @type {Error} */ (e).message}`);
      return;
    }
    this.messages.clear("project");
    this.store.projectOpened(project, name);
    this.store.projectSaved(projectState(this.store));
    this.projectName.textContent = name;
    const n = project.edits.length;
    this.messages.say("project", "ok", `${name} opened: its plan, ${n} correction${n === 1 ? "" : "s"} and ${project.review.length} review decision${project.review.length === 1 ? "" : "s"}.${this.store.tracks ? "" : " Press Run to track; the corrections are applied to the tracks."}`);
    this.sayIfOlderRules(age, project, name);
    this.keepOlderTracking(age, project, name);
    await this.check();
  }

  /** Fingerprints the footage open, once the video element has its length (or failed to play it). */
  async fingerprintFootage() {
    const footage = this.store.footage;
    if (!footage) return;
    const duration = this.store.video.playable ? this.store.video.duration : 0;
    const print = await this.client.fingerprint(footage.name.replace(/^demo /, ""), footage.blob, Number.isFinite(duration) ? duration : 0);
    // The picture's size goes with it: `throughline review` and the client summary's sketch read it.
    const { playable, width, height } = this.store.video;
    if (playable && width > 0 && height > 0) Object.assign(print, { width, height });
    if (this.store.footage === footage) this.store.fileFingerprinted("footage", print);
  }

  /** Fingerprints the detections file open (none for detections found in the footage here). */
  async fingerprintDetections() {
    const d = this.store.detections;
    if (!d) return;
    const print = d.name ? await this.client.fingerprint(d.name.replace(/^demo /, ""), d.source, 0) : null;
    if (this.store.detections === d) this.store.fileFingerprinted("detections", print);
  }

  /**
   * A project saved before paths were averaged for counting (the core decides, answering
   * `readProject`, as the command line's `Project::saved_before_averaged_paths`) counted with other
   * rules: says so, and how to count as it did.
   * @param {import("./protocol.js").ProjectAge} age
   * @param {import("./protocol.js").Project} project
   * @param {string} name
   */
  sayIfOlderRules(age, project, name) {
    const old = age.counted_before_averaged_paths;
    const facts = this.client.facts;
    if (old === null || !facts) return this.messages.clear("project-rules");
    this.messages.say("project-rules", "warn", `${name} was saved by ${project.generator}, which counted paths as the tracker gave them with a crossing margin of ${old}. By default this version averages each path over ${facts.default_smooth_seconds} s first, with a margin of ${facts.default_hysteresis}, so its counts, and the crossings its corrections name, may differ. To count as it did, set Crossing margin to ${old} and Path averaging to 0 under Set up.`);
  }

  /**
   * A project tracked before `deepsort` kept low-score boxes (the core decides, answering
   * `readProject`, as the command line's `Project::tracked_before_low_score_boxes`) is tracked as
   * it was, so that its corrections meet their tracks: with the settings the core gives, its own
   * over the older defaults.
   * @param {import("./protocol.js").ProjectAge} age
   * @param {import("./protocol.js").Project} project
   * @param {string} name
   */
  keepOlderTracking(age, project, name) {
    const settings = age.tracked_before_low_score_boxes;
    if (settings === null) return this.messages.clear("project-tracking");
    const method = project.tracking ? project.tracking.method || "" : "";
    this.store.plans.setSetting("tracker", settings);
    this.store.plans.setSetting("trackerFor", method);
    this.messages.say("project-tracking", "ok", `${name} was tracked by ${project.generator}, whose DeepSORT used no box scoring under 0.3 and let any box it used start a track; it is tracked the same way here while the method stays ${method === "" ? "the best for these detections" : method}, so that its corrections meet their tracks, and saved with those settings.`);
  }

  /** Says so when the footage or detections open are not those the work was made with. */
  async check() {
    const { madeWith } = this.store.work;
    const opened = this.store.prints;
    const why = [];
    for (const kind of /** @type {const} */ (["footage", "detections"])) {
      const recorded = madeWith[kind];
      const now = opened[kind];
      if (!recorded || !now) continue;
      const differs = await this.client.fingerprintDiffers(recorded, now);
      if (differs) why.push(`${differs}.`);
    }
    if (!why.length) return this.messages.clear("project-files");
    this.messages.say("project-files", "warn", `This work was made with other files. ${why.join(" ")} Its corrections name tracks of those files, so they may not apply here: open the footage and detections it was made with, or check each correction under Review, Edits.`);
  }
}

/**
 * What a project file holds of the work (its files' fingerprints aside).
 * @param {PageStore} store
 * @returns {Record<string, unknown>}
 */
function projectWork(store) {
  const { plan, settings, work } = store;
  /** @type {Record<string, unknown>} */
  const p = {
    plan: JSON.parse(planForCore(plan).json),
    tracking: trackingOf(settings),
    edits: work.edits,
    review: [...work.marks].map(([key, decision]) => ({ key, decision })),
  };
  if (work.site) p.site = work.site;
  if (work.extras.tallies) p.tallies = work.extras.tallies;
  if (work.extras.correction) p.correction = work.extras.correction;
  const detector = detectorFields(settings);
  if (Object.keys(detector).length) p.detector = detector;
  return p;
}

/**
 * The work as a project file holds it, as text to compare.
 * @param {PageStore} store
 */
export function projectState(store) {
  return JSON.stringify(projectWork(store));
}

/**
 * The project file against the work, as said beside Save project: "saved" while it holds the work
 * as it is; "not saved yet" or "changed since saved" when the counts need one to be reproduced
 * (corrections, hand counts or a factor) and it does not; else "".
 * @param {PageStore} store
 * @returns {"" | "saved" | "not saved yet" | "changed since saved"}
 */
export function projectStatus(store) {
  const { work } = store;
  if (work.savedAs && projectState(store) === work.savedAs) return "saved";
  const needed = work.edits.length > 0 || Boolean(work.extras.tallies || work.extras.correction);
  if (!needed) return "";
  return work.savedAs ? "changed since saved" : "not saved yet";
}

/**
 * Whether the counts need a project file to be reproduced and it does not hold the work as it is.
 * @param {PageStore} store
 */
export function projectUnsaved(store) {
  const status = projectStatus(store);
  return status === "not saved yet" || status === "changed since saved";
}

/**
 * The name Save project gives the project file: from the site's name, when there is one.
 * @param {string} site
 */
export function projectFileName(site) {
  return `${site ? site.replace(/[^\p{L}\p{N}_.-]+/gu, "-") : "throughline"}-project.json`;
}

/**
 * The project's tracking: the method chosen, and the longest gap to bridge with the footage when
 * one is set (as tracker settings).
 * @param {import("./plan.js").Settings} settings
 */
function trackingOf(settings) {
  /** @type {{method?: string, settings?: Record<string, unknown>}} */
  const tracking = settings.method ? { method: settings.method } : {};
  const fields = trackerFields(settings, settings.method || "");
  const bridge = Number(settings.bridgeFrames || "");
  if (Number.isInteger(bridge) && bridge > 0) fields.bridge_frames = bridge;
  if (Object.keys(fields).length) tracking.settings = fields;
  return tracking;
}
