// @ts-check
// The Tracking panel: the method, bridging of missed detections, Run and Cancel. Tracking runs in
// one piece inside the worker (with footage open and bridging on, the worker then reads the footage
// again to bridge gaps), so Cancel replaces the worker and gives the new one the detections and plan
// again, and the tracks shown before the cancelled run: tracked again as they were (the same bytes),
// so the counts on screen stay as they were and go on answering plan changes.

import { byId, el } from "./dom.js";
import { hasCountingGeometry, trackerFields } from "./plan.js";
import { Cancelled } from "./protocol.js";
import { TrackView } from "./tracks.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./core-client.js").CoreClient} CoreClient */
/** @typedef {import("./messages.js").Messages} Messages */
/** @typedef {import("./plan-sync.js").PlanSync} PlanSync */
/** @typedef {import("./edit-sync.js").EditSync} EditSync */
/**
 * How tracks were made: the method ("" for the best for the detections), the tracker settings JSON
 * ("" for the method's defaults), the footage bridged with (null: none) and whether bridging was asked for.
 * @typedef {{method: string, settings: string, footage: import("./protocol.js").TrackFootage | null, bridging: boolean}} TrackingRun
 */

export class RunPanel {
  /**
   * @param {PageStore} store
   * @param {CoreClient} client
   * @param {Messages} messages
   * @param {PlanSync} planSync
   * @param {EditSync} editSync
   */
  constructor(store, client, messages, planSync, editSync) {
    this.store = store;
    this.client = client;
    this.messages = messages;
    this.planSync = planSync;
    this.editSync = editSync;
    /** @type {{said: string, tracks: number} | null} what the last Run made, said under it */
    this.made = null;
    this.method = byId("method", HTMLSelectElement);
    this.run = byId("run", HTMLButtonElement);
    this.cancel = byId("cancel-run", HTMLButtonElement);
    this.bar = byId("progress", HTMLProgressElement);
    this.status = byId("run-status", HTMLElement);
    /** @type {Promise<void> | null} while a new worker is given the detections and plan again */
    this.restoring = null;
    this.bridgeFrames = byId("bridge-frames", HTMLInputElement);
    /** @type {TrackingRun | null} how the tracks shown were made (null: none shown) */
    this.shown = null;
    /** @type {boolean} a cancelled run keeps the tracks shown before it */
    this.keepShown = false;
    // The methods come from the core's registry once it has started.
    client.ready.then(() => this.listMethods()).catch(() => {});
    client.ready.then(() => { if (client.facts) this.bridgeFrames.max = String(client.facts.max_bridge_frames); }).catch(() => {});
    this.method.addEventListener("change", () => store.settingChanged("method", this.method.value));
    this.bridgeFrames.value = store.settings.bridgeFrames ?? "";
    this.bridgeFrames.addEventListener("change", () => store.settingChanged("bridgeFrames", this.bridgeFrames.value.trim()));
    this.cancel.addEventListener("click", () => this.cancelRun());
    this.run.addEventListener("click", () => this.track());
    store.subscribe(["busy"], () => { this.run.disabled = store.tracking || store.finding; });
    store.subscribe(["method"], () => {
      this.listMethods();
      this.bridgeFrames.value = store.settings.bridgeFrames ?? "";
    });
    store.subscribe(["detections"], () => {
      this.made = null;
      this.status.textContent = store.detections ? "Ready: press Run to track and count." : "No detections yet: open them, or find moving objects in the footage (Set up).";
    });
    store.subscribe(["tracks"], () => this.sayMade());
  }

  /** Fills the method list from the core's registry and selects the kept choice. */
  listMethods() {
    const facts = this.client.facts;
    if (!facts) return;
    for (const m of facts.methods) {
      if (![...this.method.options].some((o) => o.value === m.name)) this.method.append(el("option", { value: m.name, text: m.label }));
    }
    this.method.value = this.store.settings.method || "";
  }

  cancelRun() {
    this.cancel.hidden = true;
    const detections = this.store.detections;
    const previous = this.store.tracks && detections ? this.shown : null;
    this.keepShown = previous !== null;
    this.restoring = (async () => {
      try {
        await this.client.restart();
        if (detections) await this.client.loadDetections(await detections.source.arrayBuffer());
        await this.editSync.send();
        if (previous !== null) {
          this.status.textContent = "Bringing back the tracks shown before…";
          await this.client.track(previous.method, previous.settings, previous.footage, (done, total, stage) => {
            const what = stage === "bridging" ? "following people in the footage again" : "tracking again";
            this.status.textContent = `Bringing back the tracks shown before: ${what}, frame ${done} of ${total}…`;
          });
          this.status.textContent = "The counts shown are those from before the cancelled run.";
        }
        await this.planSync.send();
      } catch (e) {
        // The counts on screen are no longer the engine's: take them away rather than show them.
        this.store.trackingCancelled();
        this.shown = null;
        this.status.textContent = "";
        this.messages.say("run", "error", `The tracks from before could not be brought back (${/** @type {Error} */ (e).message}): press Run to track again.`);
      }
    })().finally(() => { this.restoring = null; });
  }

  async track() {
    if (this.restoring) await this.restoring;
    if (!this.store.detections) {
      this.messages.say("run", "error", "Open a detections file first (Set up, Open detections): the boxes an object detector found in each frame, as text, CSV or JSON. No detections? Under Set up, Find moving objects finds them in footage from a fixed camera.");
      return;
    }
    this.messages.clear("run");
    // This run as set when Run was pressed (the fields may change while it runs).
    const run = this.trackingRun();
    if (typeof run === "string") {
      this.messages.say("run", "error", run);
      return;
    }
    this.showBusy(true);
    this.status.textContent = "Tracking…";
    const started = performance.now();
    try {
      const out = await this.client.track(run.method, run.settings, run.footage, (done, total, stage) => {
        this.bar.value = total ? done / total : 0;
        this.status.textContent = stage === "bridging"
          ? `Following people across missed detections in the footage… frame ${done} of ${total}`
          : `Tracking… frame ${done} of ${total}`;
      });
      this.store.tracksReady(new TrackView(out.boxes, out.trackList), out.bridged);
      this.shown = run;
      // Counted before Run says it is done: "tracks in" is then the end of the whole run, and
      // Run and Find come back in the same step (a check of the plan against the picture made
      // the count's round trip longer, and a test saw "done" with Find still disabled).
      await this.planSync.sendSettled();
      const seconds = ((performance.now() - started) / 1000).toFixed(1);
      const n = out.bridged && "joined" in out.bridged ? out.bridged.joined : null;
      const joined = n === null ? "" : `, ${n} ${n === 1 ? "gap" : "gaps"} bridged with the footage`;
      this.made = { said: `${out.tracks} tracks in ${seconds} s${joined}`, tracks: out.tracks };
      this.status.textContent = this.madeText();
      if (run.bridging && !run.footage) this.messages.say("run", "warn", `${this.whyNoFootage()} These counts are from the detections alone.`);
      if (!hasCountingGeometry(this.store.plan)) {
        this.messages.say("run", "warn", "The plan has no lines or zones, so nothing was counted. Press Draw line and click two points across the path, or open a plan file; the counts appear at once.");
      }
      // From setting up, on to the counts; a person already reviewing stays where they are.
      if (this.store.view === "setup" && this.store.results) this.store.viewChosen("results");
    } catch (e) {
      this.status.textContent = "";
      if (e instanceof Cancelled && this.keepShown) {
        this.messages.say("run", "warn", "Tracking was cancelled. The counts shown before are kept, with the detections and the plan: press Run to track again.");
      } else if (e instanceof Cancelled) {
        this.store.trackingCancelled();
        this.shown = null;
        this.messages.say("run", "warn", "Tracking was cancelled. The detections and the plan are kept: press Run to track again.");
      } else {
        this.messages.say("run", "error", `Tracking stopped: ${/** @type {Error} */ (e).message}`);
      }
    } finally {
      this.showBusy(false);
    }
  }

  /**
   * How Run tracks now: the method chosen, tracker settings with the longest gap to bridge when one
   * is given ("" for the method's defaults: no bridging), and the footage when it plays here with a
   * picture; or what to fix in the gap's field, in words.
   * @returns {TrackingRun | string}
   */
  trackingRun() {
    const text = this.bridgeFrames.value.trim();
    const max = this.client.facts ? this.client.facts.max_bridge_frames : Infinity;
    const n = Number(text);
    if (this.bridgeFrames.validity.badInput || !/^\d*$/.test(text) || n > max) {
      const typed = this.bridgeFrames.validity.badInput ? "is not a number" : `is ${text}`;
      return `"Bridge gaps up to (frames)" under Set up, Missed detections ${typed}: type a whole number of frames from 1 to ${max}, or 0 or nothing to leave bridging off.`;
    }
    // Settings the page has no field for (an older project's) apply to the method they were for.
    const method = this.method.value;
    const fields = trackerFields(this.store.settings, method);
    if (n > 0) fields.bridge_frames = n;
    const settings = Object.keys(fields).length ? JSON.stringify(fields) : "";
    const { footage, video } = this.store;
    const pictured = video.playable && video.width > 0 && video.height > 0;
    const withFootage = footage && pictured && n > 0 ? { file: footage.blob, width: video.width, height: video.height } : null;
    return { method, settings, footage: withFootage, bridging: n > 0 };
  }

  /** The corrections changed the tracks: Run's line says how many they leave. */
  sayMade() {
    if (this.made && !this.store.tracking) this.status.textContent = this.madeText();
  }

  /** What the last Run made (the tracker's own count), and how many the person's corrections leave (a merge joins two). */
  madeText() {
    const made = this.made;
    if (!made) return "";
    const now = this.store.tracks ? this.store.tracks.list.length : null;
    const after = now !== null && now !== made.tracks ? `; ${now} after your corrections` : "";
    return `${made.said}${after}.`;
  }

  /** Why a run that asked for bridging had no footage to bridge with, and what to do. */
  whyNoFootage() {
    const { footage, video } = this.store;
    if (!footage) return "Bridging gaps in the detections needs the footage: open it under Set up, Files, and press Run again.";
    if (!video.playable) return `Bridging gaps in the detections needs footage that plays here, and ${footage.name} does not (or not yet: wait for its picture, or see the message under it), then press Run again.`;
    return `Bridging gaps in the detections needs footage with a picture, and ${footage.name} has none (sound alone?): open the video itself under Set up, Files, and press Run again.`;
  }

  /** @param {boolean} on */
  showBusy(on) {
    this.bar.hidden = !on;
    if (on) this.bar.value = 0;
    this.cancel.hidden = !on;
    this.store.trackingChanged(on);
  }
}
