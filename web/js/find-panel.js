// @ts-check
// "Only footage? Find what moves in it": the core's motion detector searches every frame of the
// footage. Frames are decoded in the worker with WebCodecs where the browser has it and the footage is
// WebM or MP4 (hundreds of frames a second); otherwise taken by seeking and drawing each one. Either
// way the boxes found become the detections, as if opened from a file.

import { byId, el, clockText } from "./dom.js";
import { setHysteresis } from "./plan.js";
import { Cancelled } from "./protocol.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./core-client.js").CoreClient} CoreClient */
/** @typedef {import("./messages.js").Messages} Messages */
/** @typedef {import("./picture.js").Picture} Picture */
/** @typedef {import("./protocol.js").DetectionSummary} DetectionSummary */
/** @typedef {import("./protocol.js").FootageSearched} FootageSearched */

/** The two height fields and the settings they give (the detector's settings: far_height, near_height). */
export const HEIGHTS = /** @type {const} */ ([["far-height", "farHeight", "far_height"], ["near-height", "nearHeight", "near_height"]]);

/**
 * The detector's settings the page's fields hold, as a detector settings file writes them (the
 * project file records them: `throughline run --footage --edits PROJECT` finds the same boxes).
 * @param {Record<string, string | undefined>} settings the page's settings (strings, as typed)
 * @returns {Record<string, number>}
 */
export function detectorFields(settings) {
  /** @type {Record<string, number>} */
  const out = {};
  for (const [, key, setting] of HEIGHTS) {
    const text = settings[key] ?? "";
    const v = Number(text);
    if (text !== "" && Number.isFinite(v) && v > 0) out[setting] = v;
  }
  return out;
}

export class FindPanel {
  /**
   * @param {PageStore} store
   * @param {CoreClient} client
   * @param {Messages} messages
   * @param {Picture} picture
   */
  constructor(store, client, messages, picture) {
    this.store = store;
    this.client = client;
    this.messages = messages;
    this.picture = picture;
    this.button = byId("find-objects", HTMLButtonElement);
    this.cancel = byId("cancel-find", HTMLButtonElement);
    this.bar = byId("find-progress", HTMLProgressElement);
    this.status = byId("find-status", HTMLElement);
    this.cancelled = false;
    /** @type {string | undefined} the step of finding that progress was last shown for */
    this.stage = undefined;
    /** performance.now() when that step started */
    this.stageStarted = 0;
    for (const [id, key] of HEIGHTS) {
      const input = byId(id, HTMLInputElement);
      input.value = store.settings[key] ?? "";
      input.addEventListener("change", () => store.settingChanged(key, input.value));
      // A project opened brings the heights it was made with.
      store.subscribe(["detector"], () => { input.value = store.settings[key] ?? ""; });
    }
    this.cancel.addEventListener("click", () => {
      this.cancelled = true;
      client.cancelFind();
    });
    this.button.addEventListener("click", () => this.find());
    // Not while Run tracks: the worker would only start finding once tracking and bridging end.
    store.subscribe(["footage", "video", "busy"], () => { this.button.disabled = !store.video.playable || store.finding || store.tracking; });
    // The footage's own frame rate, read from its first frames once it plays: a plan at another
    // rate is offered it at once, not only after playing or searching the footage. A file its
    // container says is cut short is said to be so then too (it plays to its cut without a word).
    /** @type {Blob | null} */
    let factsOf = null;
    store.subscribe(["video"], () => {
      const footage = store.footage;
      if (!footage || !store.video.playable || factsOf === footage.blob) return;
      factsOf = footage.blob;
      this.messages.clear("footage-cut");
      client.footageFacts(footage.blob).then(({ rate, cut }) => {
        if (store.footage !== footage) return;
        if (rate !== null) store.frameRateMeasured(rate, "is coded at");
        if (cut) this.messages.say("footage-cut", "warn", cutShortMessage(footage.name, cut, store.video.duration));
      }, () => {});
    });
    // The advice on the margin is about boxes found in footage: gone once other detections are in use.
    store.subscribe(["detections"], () => { if (store.detections && store.detections.name !== "") this.messages.clear("margin"); });
  }

  /** Detector settings JSON from the two height fields. */
  detectorSettings() {
    // The fields as typed (a change not yet taken by the store included).
    const typed = Object.fromEntries(HEIGHTS.map(([id, key]) => [key, byId(id, HTMLInputElement).value]));
    return JSON.stringify(detectorFields(typed));
  }

  /**
   * Progress of finding objects: bar, frames a second, time left. `stage` "background": the first
   * reading, which learns the empty scene from frames spread over the whole clip.
   * @param {number} done
   * @param {number} total
   * @param {number} started performance.now() at the start
   * @param {string} [stage]
   */
  showProgress(done, total, started, stage) {
    const now = performance.now();
    if (this.stageStarted < started || stage !== this.stage) {
      this.stage = stage;
      this.stageStarted = now;
    }
    const rate = done / Math.max(1e-3, (now - this.stageStarted) / 1000);
    this.bar.value = done / Math.max(1, total);
    const step = stage === "background" ? "Learning the empty scene from the whole clip" : "Finding moving objects";
    this.status.textContent = `${step}: frame ${done} of ${total}, ${rate.toFixed(0)} frames a second, ${Math.ceil(Math.max(0, total - done) / Math.max(rate, 1e-3))} s left`;
  }

  async find() {
    const footage = this.store.footage;
    if (!this.store.video.playable || !footage) return;
    this.picture.pause();
    for (const key of ["find", "camera", "gaps"]) this.messages.clear(key);
    this.cancelled = false;
    this.showBusy(true);
    this.status.textContent = "Starting…";
    const started = performance.now();
    try {
      const { summary, how, notes } = await this.search(footage.blob, started);
      const seconds = (performance.now() - started) / 1000;
      const source = new Blob([await this.client.detectionsText()]);
      this.store.detectionsLoaded(summary, source, `found in ${footage.name}: ${summary.rows} boxes, ${summary.frames} frames`, "", notes);
      // Run is at the top of the work; on a phone that is far above (a newcomer's trial): it is offered here too.
      const runNow = el("button", { type: "button", text: "Run now", onclick: () => byId("run", HTMLButtonElement).click() });
      this.status.replaceChildren(`Found ${summary.rows} boxes of moving objects over ${summary.frames} frames in ${seconds.toFixed(1)} s${how}. Press Run to track and count them. `, runNow);
      // The core's words on what it found (a camera that moved), said as the command line says them.
      if (summary.warnings.length) this.messages.say("camera", "warn", `${footage.name}: ${summary.warnings.join(" ")}.`);
      this.offerMargin();
    } catch (e) {
      this.status.textContent = "";
      if (e instanceof Cancelled) this.messages.say("find", "warn", "Finding objects was cancelled; the detections opened before are kept.");
      else this.messages.say("find", "error", `Finding objects stopped: ${/** @type {Error} */ (e).message}`);
    } finally {
      this.showBusy(false);
      this.picture.seekFrame(1);
    }
  }

  /** @param {boolean} on */
  showBusy(on) {
    this.bar.hidden = !on;
    this.cancel.hidden = !on;
    this.store.findingChanged(on);
  }

  /**
   * Searches the footage in the worker where it can decode it, else by drawing its frames here.
   * Resolves to the detections' summary and how the frames were read (for the status line).
   * @param {Blob} footage
   * @param {number} started
   * @returns {Promise<{summary: DetectionSummary, how: string, notes: string[]}>}
   */
  async search(footage, started) {
    const video = this.picture.video;
    const w = video.videoWidth;
    const h = video.videoHeight;
    const total = Math.max(1, Math.round(video.duration * this.store.fps));
    const found = typeof VideoDecoder === "function"
      ? await this.client.findInFootage(footage, w, h, this.detectorSettings(), total, (done, n, stage) => this.showProgress(done, n, started, stage))
      : { fallback: "this browser cannot decode video inside the page" };
    if ("fallback" in found) {
      this.messages.say("find", "warn", `Frames are taken by playing the footage, which is slower: ${found.fallback}.`);
      return { summary: await this.findByDrawing(w, h, total, started), how: "", notes: [] };
    }
    this.store.frameRateMeasured(found.frameRate, "is coded at");
    this.warnIfShort(found, video.duration);
    /** @type {string[]} */
    const notes = [];
    if (found.filled) {
      const frames = found.filled === 1 ? "1 frame missing from it was" : `${found.filled} frames missing from it were`;
      const note = `${this.store.footage ? this.store.footage.name : "the footage"}: ${frames} filled with the pictures either side (it was recorded at a variable frame rate, or the camera or recorder dropped frames), so that frame numbers and times follow its clock`;
      this.messages.say("gaps", "warn", `${note}, as on the command line.`);
      notes.push(note);
    }
    return { summary: found.summary, how: ` (decoded in this page from the ${containerName(found.container)})`, notes };
  }

  /**
   * Says so when reading the footage stopped early or gave fewer frames than it should have.
   * @param {FootageSearched} found
   * @param {number} duration seconds
   */
  warnIfShort(found, duration) {
    if (found.stopped) {
      this.messages.say("find", "warn", `Reading the footage stopped early: ${found.stopped}. The objects found in frames 1 to ${found.frames} are kept; the rest of the footage was not searched. The file may be damaged or cut short: re-encode it with ffmpeg and search again to count all of it.`);
      return;
    }
    // The footage's own rate, where the decoder told it, not the plan's (which may be wrong).
    const expected = found.frameRate ? Math.round(duration * found.frameRate) : found.expected;
    if (found.frames < 0.98 * expected) {
      this.messages.say("find", "warn", `Only ${found.frames} frames could be read, but the footage should have about ${expected}. The file may be damaged: re-encode it with ffmpeg and search again to count all of it.`);
    }
  }

  /**
   * The slow way, for footage or browsers WebCodecs cannot serve: seek the video element to each
   * frame, draw it and hand its RGBA pixels to the detector (about 11 frames a second at 640x360).
   * @param {number} w
   * @param {number} h
   * @param {number} total
   * @param {number} started
   */
  async findByDrawing(w, h, total, started) {
    const g = el("canvas", { width: w, height: h }).getContext("2d", { willReadFrequently: true });
    if (!g) throw new Error("this browser cannot draw the footage's frames");
    await this.client.startDetection(w, h, this.detectorSettings());
    // The background first, from frames spread over the whole clip (the frames the worker names).
    const sampled = await this.client.backgroundFrames(total);
    for (const [k, f] of sampled.entries()) {
      if (this.cancelled) throw new Cancelled();
      await this.picture.presentFrame(f);
      g.drawImage(this.picture.video, 0, 0, w, h);
      await this.client.sampleRgba(g.getImageData(0, 0, w, h).data.buffer, w, h);
      this.showProgress(k + 1, sampled.length, started, "background");
    }
    for (let f = 1; f <= total; f++) {
      if (this.cancelled) throw new Cancelled();
      await this.picture.presentFrame(f);
      g.drawImage(this.picture.video, 0, 0, w, h);
      const pixels = g.getImageData(0, 0, w, h).data.buffer;
      await this.client.detectRgba(pixels, w, h);
      this.showProgress(f, total, started);
    }
    return this.client.finishDetection();
  }

  /**
   * Boxes found in footage jump when people join or split near a line: offers the steadier
   * crossing margin unless the plan has one as wide already.
   */
  offerMargin() {
    const facts = this.client.facts;
    if (!facts) return;
    const lines = facts.footage_hysteresis;
    const zones = facts.default_hysteresis;
    const rules = this.store.plan.rules;
    const margin = rules && rules.hysteresis;
    if (margin !== undefined && margin >= lines) return;
    this.messages.say("margin", "ok", `Boxes found in footage jump when two people join or split near a line. A crossing margin of ${lines} box heights counts line crossings more steadily: a count point must get that far past a line before the crossing counts. Zones keep ${zones}, because people leaving a zone at the picture's edge are soon out of sight.`, [
      el("button", { type: "button", text: `Use ${lines}`, onclick: () => { this.store.planEdited((p) => setHysteresis(p, lines, zones)); this.messages.clear("margin"); } }),
    ]);
  }
}

/**
 * A container's everyday name: "WebM video", "MP4 video"; else "video file".
 * @param {string} container as the worker names it ("webm", "mp4")
 */
function containerName(container) {
  const names = /** @type {Record<string, string>} */ ({ webm: "WebM video", mp4: "MP4 video", mkv: "Matroska video", mov: "QuickTime video" });
  return names[container.toLowerCase()] || "video file";
}

/**
 * Said when a footage's container says the file is cut short.
 * @param {string} name the file's name
 * @param {string} why the core's words: what it says it holds, and what the file holds
 * @param {number} seconds how long the browser says it is (the length it declares, not where it was cut)
 */
export function cutShortMessage(name, why, seconds) {
  const declared = seconds > 0 ? `, though the player shows its whole length (${clockText(seconds)})` : "";
  return `${name} seems cut short (an interrupted copy?): ${why}. Counts stop where its frames stop${declared}. Copy it again from the camera or card if you can; if it is all there is, say so with the counts.`;
}
