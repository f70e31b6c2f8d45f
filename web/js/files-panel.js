// @ts-check
// The Files panel: opening footage, detections and plans (buttons, or dropped on the picture), the
// names of what is open, and the warnings when detections cannot belong to the footage.

import { byId } from "./dom.js";
import { emptyPlan, parsePlanText } from "./plan.js";
import { Cancelled } from "./protocol.js";
import { withoutDocs } from "./messages.js";

/** How the demo's detections are named when the demo opens them (demo.js). */
export const DEMO_DETECTIONS = "demo detections.csv";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./core-client.js").CoreClient} CoreClient */
/** @typedef {import("./messages.js").Messages} Messages */

export class FilesPanel {
  /**
   * @param {PageStore} store
   * @param {CoreClient} client
   * @param {Messages} messages
   */
  constructor(store, client, messages) {
    this.store = store;
    this.client = client;
    this.messages = messages;
    this.footageName = byId("footage-name", HTMLElement);
    this.detectionsName = byId("detections-name", HTMLElement);
    /** Moves while the core reads a detections file (in one call: it has no steps to count). */
    this.detectionsBar = byId("detections-progress", HTMLProgressElement);
    /** Detections files being read now: the bar stays while any is. */
    this.readingFiles = 0;
    this.planName = byId("plan-name", HTMLElement);
    /** @type {((text: string, name: string) => void) | null} opens a project file (project-panel.js), once there is one */
    this.openProject = null;
    store.subscribe(["footage"], () => { nameShown(this.footageName, store.footage ? store.footage.name : "none"); });
    store.subscribe(["detections"], () => nameShown(this.detectionsName, store.detections ? store.detections.label : "none"));
    store.subscribe(["planName"], () => { nameShown(this.planName, store.planName); });
    // Checked again whenever the footage or the detections change (Find replaces them too).
    store.subscribe(["video", "detections"], () => this.checkFit());
    nameShown(this.planName, store.planName);
    this.bindInputs();
    this.bindDrop(byId("stage", HTMLElement));
  }

  bindInputs() {
    /** @param {string} id @param {(file: File) => void} open */
    const onFile = (id, open) => {
      const input = byId(id, HTMLInputElement);
      input.addEventListener("change", () => {
        const f = input.files && input.files[0];
        // Emptied, so that the same file chosen again (after an undo, say) is opened again.
        input.value = "";
        if (f) open(f);
      });
    };
    onFile("open-footage", (f) => this.openOwnFootage(f));
    onFile("open-detections", async (f) => this.openDetections(await f.arrayBuffer(), f.name));
    onFile("open-plan", async (f) => this.openPlanFile(await f.text(), f.name));
  }

  /**
   * Drag and drop: footage by type, JSON with a frame rate or lines is a plan, anything else detections.
   * @param {HTMLElement} stage
   */
  bindDrop(stage) {
    stage.addEventListener("dragover", (e) => { e.preventDefault(); stage.classList.add("dragover"); });
    stage.addEventListener("dragleave", () => stage.classList.remove("dragover"));
    stage.addEventListener("drop", async (e) => {
      e.preventDefault();
      stage.classList.remove("dragover");
      for (const f of e.dataTransfer ? e.dataTransfer.files : []) {
        if (f.type.startsWith("video/") || /\.(webm|mp4|mkv|mov|avi)$/i.test(f.name)) {
          this.openOwnFootage(f);
          continue;
        }
        const text = await f.text();
        if (/\.json$/i.test(f.name) && /"(frame_rate|screenlines|format)"/.test(text.slice(0, 4000))) this.openPlanFile(text, f.name);
        else this.openDetections(new TextEncoder().encode(text).buffer, f.name);
      }
    });
  }

  /**
   * @param {Blob} blob
   * @param {string} name
   */
  openFootage(blob, name) {
    // What was said of the footage before (it would not play; what finding objects in it said)
    // is not said of this one (a newcomer's trial: old messages piled up).
    for (const key of ["footage", "play", "find", "camera", "gaps", "footage-cut"]) this.messages.clear(key);
    this.store.footageOpened(name, blob);
  }

  /**
   * The person's own footage: the demo's detections and plan, while still in use, cannot be theirs
   * (other boxes, other lines, the demo's start time in a hand-in), so they are set aside, saying
   * so and what to do next; the plan comes back with Undo.
   * @param {File} file
   */
  openOwnFootage(file) {
    this.openFootage(file, file.name);
    // Once it plays (footage that does not leaves everything as it was).
    const opened = this.store.footage;
    const stop = this.store.subscribe(["video", "footage"], () => {
      stop();
      if (this.store.footage === opened && this.store.video.playable) this.setDemoAside(file.name);
    });
  }

  /**
   * The demo's detections and plan, while still in use, set aside for the person's own footage.
   * @param {string} name the footage's
   */
  setDemoAside(name) {
    const d = this.store.detections;
    const detections = Boolean(d && d.name === DEMO_DETECTIONS);
    const plan = this.store.plans.source === "demo" || this.store.plans.source === "demo-edited";
    if (!detections && !plan) return;
    this.messages.clear("demo");
    if (detections) this.store.detectionsSetAside();
    if (plan) this.store.planReplaced(emptyPlan(), "new", "drawn here");
    const what = [detections ? "detections" : "", plan ? "plan (its lines, zone, start time and frame rate)" : ""].filter(Boolean).join(" and ");
    const next = [
      detections ? "find moving objects in your footage (Find moving objects, below) or open its detections" : "",
      plan ? "draw your lines, or open your plan" : "",
    ].filter(Boolean).join("; ");
    const back = plan ? " Undo (Ctrl+Z) brings the demo's plan back." : "";
    this.messages.say("own-footage", "ok", `${name} is open, and the demo's ${what} set aside: they belong to the demo's scene. Next, ${next}.${back}`);
    // Out of date once counts are made.
    const stop = this.store.subscribe(["results"], () => {
      if (!this.store.results) return;
      this.messages.clear("own-footage");
      stop();
    });
  }

  /**
   * Gives a detections file to the core; its summary, or what is wrong with it, is shown.
   * @param {ArrayBuffer} bytes handed over to the worker
   * @param {string} name
   */
  async openDetections(bytes, name) {
    this.messages.clear("detections");
    nameShown(this.detectionsName, `${name} (reading…)`);
    this.detectionsBar.hidden = false;
    this.readingFiles += 1;
    try {
      const source = new Blob([bytes]); // a copy: the bytes themselves go to the worker
      const summary = await this.client.loadDetections(bytes);
      this.store.detectionsLoaded(summary, source, `${name}: ${summary.rows} boxes, ${summary.frames} frames`, name);
      if (summary.warnings.length || summary.skipped_rows) {
        this.messages.say("detections", "warn", readingWarnings(name, summary.skipped_rows, summary.warnings));
      }
      if (!this.store.video.playable) this.store.pictureSized(Math.ceil(summary.max_x) || 640, Math.ceil(summary.max_y) || 360);
    } catch (e) {
      // The core keeps the detections it had: say which are still in use, as for a plan.
      const kept = this.store.detections;
      nameShown(this.detectionsName, kept ? kept.label : `${name}: not read`);
      const still = kept ? ` The detections in use are unchanged: ${kept.label}.` : "";
      // The core's message may end without a full stop: the sentences must not run together.
      const why = /** @type {Error} */ (e).message.replace(/[.\s]*$/, ".");
      this.messages.say("detections", "error", `${name} could not be read: ${why}${still}`);
    } finally {
      this.readingFiles -= 1;
      if (this.readingFiles === 0) this.detectionsBar.hidden = true;
    }
  }

  /**
   * @param {string} text
   * @param {string} name
   */
  async openPlanFile(text, name) {
    // A project file holds a plan and more: it is opened as the project it is.
    if (this.openProject && isProjectText(text)) return this.openProject(text, name);
    let plan;
    try {
      plan = parsePlanText(text, name);
    } catch (e) {
      // The core's reading names the line and column and says what is wrong in words ("trailing
      // comma"), as the command line does; the browser's own parser says less.
      let said = /** @type {Error} */ (e).message;
      try {
        await this.client.checkPlan(text);
      } catch (core) {
        if (!(core instanceof Cancelled)) said = `${name} was not opened: ${withoutDocs(/** @type {Error} */ (core).message)}. The plan in use is unchanged; fix the file and open it again.`;
      }
      this.messages.say("plan-file", "error", said);
      return;
    }
    try {
      // The core reads the file's fields as the command line would, so a mistake only the file
      // can mend is named at its line there and the plan in use stays (a plan taken with a
      // misspelt field counted nothing); what the page can mend is shown after it is taken.
      await this.client.checkPlan(text);
    } catch (e) {
      const why = e instanceof Cancelled ? "the engine was restarted while reading it" : withoutDocs(/** @type {Error} */ (e).message);
      const what = e instanceof Cancelled ? "open it again" : "fix the file and open it again";
      this.messages.say("plan-file", "error", `${name} was not opened: ${why}. The plan in use is unchanged; ${what}.`);
      return;
    }
    this.messages.clear("plan-file");
    this.store.planReplaced(plan, "file", name);
  }

  /** Warns when the detections cannot belong to this footage: too big, or running past its end. */
  checkFit() {
    this.messages.clear("fit");
    const d = this.store.detections;
    const video = this.store.video;
    if (!d || !video.playable) return;
    const s = d.summary;
    const problems = [];
    if (s.max_x > video.width * 1.25 || s.max_y > video.height * 1.25) {
      problems.push(`The detections reach x = ${Math.round(s.max_x)}, y = ${Math.round(s.max_y)}, but the footage is ${video.width} × ${video.height} pixels. Were they made on a different size of this video? Open the matching footage, or scale the detections.`);
    }
    const frames = this.store.videoFrames;
    if (frames && s.frames > frames * 1.02 + 2) {
      problems.push(`The detections run to frame ${s.frames}, but the footage has about ${frames} frames at ${this.store.fps} fps. Were they found in other footage? Open the matching footage; if they belong to this one, check the frame rate in the plan.`);
    }
    if (problems.length) this.messages.say("fit", "warn", problems.join("\n"));
  }
}

/**
 * Whether a JSON file's text is a project file (its "format" says so, near the top).
 * @param {string} text
 */
function isProjectText(text) {
  return /"format"\s*:\s*"throughline-project"/.test(text.slice(0, 400));
}

/**
 * What the page says of a file read with warnings: how many rows were skipped (when any), then
 * the core's first warnings (the one about a last row perhaps cut short comes first), and how
 * many more there are.
 * @param {string} name
 * @param {number} skipped
 * @param {string[]} warnings
 */
export function readingWarnings(name, skipped, warnings) {
  // The core's closing "N passed over in all (…)" is what the first line says already.
  const listed = warnings.filter((w) => !/^\d+ passed over in all \(/.test(w));
  const shown = listed.slice(0, 5);
  const more = listed.length - shown.length;
  const head = skipped ? `${name}: ${skipped} ${skipped === 1 ? "row" : "rows"} skipped.` : `${name}: read with ${warnings.length === 1 ? "a warning" : "warnings"}.`;
  return [head, ...shown, ...(more > 0 ? [`… and ${more} more.`] : [])].join("\n");
}

/**
 * A file's name in the Files panel; whole in its tooltip, where the panel's width cuts it short.
 * @param {HTMLElement} el
 * @param {string} text
 */
function nameShown(el, text) {
  el.textContent = text;
  el.title = text;
}
