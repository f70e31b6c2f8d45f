// @ts-check
// Handing the counts in (Results, Hand in): the interval grid and the movement matrix as the core
// writes them for the command line too (`throughline run --site … --start …`), shown as tables,
// copied to the clipboard as tab-separated text (a spreadsheet pastes it into cells) and downloaded
// as CSV, each file named from the site and the recording's date. The context the core heads them
// with (site, plan, files) is made here, once, for these tables and the client summary alike.

import { byId, download } from "./dom.js";
import { gridView, matrixView, shape } from "./sheets.js";
import { projectFileName, projectStatus, projectUnsaved } from "./project-panel.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./core-client.js").CoreClient} CoreClient */
/** @typedef {import("./protocol.js").HandIn} HandIn */
/** @typedef {import("./protocol.js").HandinContext} HandinContext */
/** @typedef {import("./protocol.js").InputNote} InputNote */

/** The plan's name in the hand-in files once changed here: the file Save plan writes, which reproduces the counts. */
export const PLAN_FILE = "plan.json";

/**
 * The plan's name in the hand-in files: the plan file opened, while the plan is still what it
 * holds; else the file Save plan writes.
 * @param {PageStore} store
 */
export function planFileName(store) {
  return store.plans.openedAs() || PLAN_FILE;
}

/**
 * What the hand-in outputs name as their sources: the site, the plan (its file's name), the
 * footage and detections open (else those the work was made with) and, when the counts need the
 * corrections, hand counts or factor to be reproduced, the project file as Save project names it.
 * @param {PageStore} store
 * @returns {HandinContext}
 */
export function handinContext(store) {
  const { work, prints } = store;
  /** @type {HandinContext} */
  const ctx = { plan_name: planFileName(store) };
  if (work.site) ctx.site = work.site;
  const footage = prints.footage || work.madeWith.footage;
  const detections = prints.detections || work.madeWith.detections;
  if (footage) ctx.footage = footage;
  if (detections) ctx.detections = detections;
  // Found here by Find moving objects: the command line needs them as Export detections saves them.
  else if (store.detections && !store.detections.name) ctx.found_in_footage = ctx.found_in_page = true;
  if (work.edits.length || work.extras.tallies || work.extras.correction) ctx.project_name = projectFileName(work.site);
  const notes = inputNotes(store);
  if (notes.length) ctx.notes = notes;
  return ctx;
}

/**
 * What was said of the inputs that a person signing the counts needs to know, in the command
 * line's order (`throughline run` keeps its warnings for the hand-in files, so the two write the
 * same files), as facts the core words as the command line does (crate/core/src/handin/said.rs):
 * a footage frame rate other than the plan's, frames missing from the footage and filled, the
 * detections' own (rows passed over, a camera that moved), and boxes going on past the footage's end.
 * @param {PageStore} store
 * @returns {InputNote[]}
 */
export function inputNotes(store) {
  /** @type {InputNote[]} */
  const out = [];
  const d = store.detections;
  // Named as the Footage row names it (the demo's opens as "demo footage.webm", its file is footage.webm).
  const footage = store.prints.footage ? store.prints.footage.name : store.footage ? store.footage.name : "the footage";
  const measured = store.measuredRate;
  if (store.footage && measured) out.push({ frame_rate: { footage, rate: measured.rate, planned: store.fps } });
  if (d) {
    out.push(...(d.notes || []).map((said) => ({ said })));
    out.push(...d.summary.warnings.map((w) => ({ said: `${d.name || footage}: ${w}` })));
  }
  const known = store.videoFrames;
  if (d && d.name && known) out.push({ past_footage: { last_frame: d.summary.frames, footage_frames: known } });
  return out;
}

/**
 * Puts text on the clipboard; where the browser refuses the clipboard's API, through a selection.
 * @param {string} text
 */
export async function copyText(text) {
  try {
    await navigator.clipboard.writeText(text);
    return;
  } catch (e) {
    // An older browser, or a page opened from disk without the permission: copy a selection.
  }
  const area = document.createElement("textarea");
  area.value = text;
  area.setAttribute("readonly", "");
  area.className = "visually-hidden";
  document.body.append(area);
  area.select();
  const ok = document.execCommand("copy");
  area.remove();
  if (!ok) throw new Error("this browser did not allow copying");
}

export class HandinPanel {
  /**
   * @param {PageStore} store
   * @param {CoreClient} client
   */
  constructor(store, client) {
    this.store = store;
    this.client = client;
    this.root = byId("handin", HTMLElement);
    this.layout = byId("grid-layout", HTMLSelectElement);
    /** @type {HandIn | null} the tables of the counts shown */
    this.sheets = null;
    /** Numbers the requests, so that only the latest answer is shown. */
    this.asked = 0;
    store.subscribe(["results", "site", "prints", "checks", "edits", "frameRate"], () => this.refresh());
    store.subscribe(["saved", "marks", "plan", "method", "planProblem"], () => this.show());
    this.layout.addEventListener("change", () => this.show());
    byId("copy-grid", HTMLButtonElement).addEventListener("click", () => this.copy(this.grid().tab, byId("grid-copied", HTMLElement)));
    byId("copy-matrix", HTMLButtonElement).addEventListener("click", () => this.copy(this.sheets ? this.sheets.matrix.tab : "", byId("matrix-copied", HTMLElement)));
    byId("download-grid", HTMLButtonElement).addEventListener("click", () => {
      if (this.sheets) download(`${this.sheets.stem}_${this.layout.value === "long" ? "grid-long" : "grid"}.csv`, this.grid().csv, "text/csv");
    });
    byId("download-matrix", HTMLButtonElement).addEventListener("click", () => {
      if (this.sheets) download(`${this.sheets.stem}_movements.csv`, this.sheets.matrix.csv, "text/csv");
    });
  }

  /** The grid in the layout chosen. */
  grid() {
    const s = this.sheets;
    if (!s) return { csv: "", tab: "" };
    return this.layout.value === "long" ? s.long : s.wide;
  }

  /** Asks the core for the tables of the counts shown now. */
  async refresh() {
    const id = ++this.asked;
    if (!this.store.results) {
      this.sheets = null;
      this.root.hidden = true;
      return;
    }
    try {
      const sheets = await this.client.handIn(handinContext(this.store));
      if (id !== this.asked) return;
      this.sheets = sheets;
      this.show();
    } catch (e) {
      if (id === this.asked) byId("handin-missing", HTMLElement).textContent = `The hand-in tables could not be made: ${/** @type {Error} */ (e).message}`;
    }
  }

  show() {
    const s = this.sheets;
    this.root.hidden = !s;
    if (!s) return;
    byId("handin-names", HTMLElement).textContent = `Files are named from the site and the recording's date: ${s.stem}_grid.csv (or _grid-long.csv), ${s.stem}_movements.csv and ${s.stem}_summary.html. ${planNaming(this.store)}`;
    const missing = [];
    if (!this.store.work.site) missing.push("name the site (Set up, Files, Site name)");
    if (!this.store.plan.start) missing.push("give the recording's start time (Set up, Plan, Start time) for clock times and the date");
    if (projectUnsaved(this.store)) {
      const since = projectStatus(this.store) === "not saved yet" ? "it is not saved yet" : "the work has changed since it was saved";
      missing.push(`save the project (Set up, Files, Save project): the files name ${projectFileName(this.store.work.site)} as what reproduces these counts, and ${since}`);
    }
    byId("handin-missing", HTMLElement).textContent = this.store.planRefused
      ? REFUSED
      : missing.length ? `To head the tables properly, ${missing.join(", and ")}.` : "";
    for (const id of ["copy-grid", "download-grid", "copy-matrix", "download-matrix"]) byId(id, HTMLButtonElement).disabled = this.store.planRefused;
    byId("grid-view", HTMLElement).replaceChildren(...gridView(this.grid().tab));
    byId("matrix-view", HTMLElement).replaceChildren(...matrixView(s.matrix.tab));
    byId("grid-view", HTMLElement).dataset.layout = this.layout.value;
  }

  /**
   * @param {string} text tab-separated
   * @param {HTMLElement} status
   */
  async copy(text, status) {
    if (!text) return;
    try {
      await copyText(text);
      const { rows, cells } = shape(text);
      status.textContent = `Copied: ${rows} rows, up to ${cells} cells each. Paste into a spreadsheet: each value lands in its own cell.`;
    } catch (e) {
      status.textContent = `Could not copy (${/** @type {Error} */ (e).message}): download the CSV instead.`;
    }
  }
}

/** Said where the counts would be handed in while the plan shown is one the core refused. */
export const REFUSED =
  "Nothing can be handed in while the plan needs a fix (Set up, Plan): the counts shown are of the plan before your last change.";

/**
 * How the hand-in files name the plan, said beside them.
 * @param {PageStore} store
 */
function planNaming(store) {
  const opened = store.plans.openedAs();
  return opened
    ? `They name the plan as ${opened}, the file you opened: keep it with them.`
    : `They name the plan as ${PLAN_FILE}, the file Save plan writes (the plan was drawn or changed here): keep it with them.`;
}
