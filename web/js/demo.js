// @ts-check
// Where the core and the bundled demo come from (the site's files, or the single file's embedded
// copies), and opening the demo: its footage, its detections and, unless the user has a plan of
// their own, its plan.

import { parsePlanText } from "./plan.js";
import { DEMO_DETECTIONS } from "./files-panel.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./files-panel.js").FilesPanel} FilesPanel */
/** @typedef {import("./messages.js").Messages} Messages */

/**
 * @typedef {object} Sources
 * @property {() => Worker} worker starts the worker that runs the core
 * @property {() => Promise<Uint8Array>} wasm the core's WebAssembly
 * @property {((name: string) => Promise<Blob>) | null} demo a file of the bundled demo, if there is one
 */

/** @returns {Sources} */
export function sources() {
  const embedded = document.getElementById("tl-embedded");
  const workerScript = document.getElementById("tl-worker");
  if (embedded && workerScript) {
    const data = JSON.parse(embedded.textContent || "{}");
    /** @param {string} b64 */
    const bytes = (b64) => Uint8Array.from(atob(b64), (c) => c.charCodeAt(0));
    const workerCode = workerScript.textContent || "";
    return {
      worker: () => new Worker(URL.createObjectURL(new Blob([workerCode], { type: "text/javascript" }))),
      wasm: async () => bytes(data.wasm),
      demo: data.demo
        ? async (name) => (name === "footage.webm" ? new Blob([bytes(data.demo[name])], { type: "video/webm" }) : new Blob([bytes(data.demo[name])]))
        : null,
    };
  }
  return {
    worker: () => new Worker("worker.js"),
    wasm: async () => new Uint8Array(await (await fetch("pkg/throughline_wasm_bg.wasm")).arrayBuffer()),
    demo: async (name) => {
      const r = await fetch(`demo/${name}`);
      if (!r.ok) throw new Error(`demo/${name}: ${r.status}`);
      return r.blob();
    },
  };
}

export class Demo {
  /**
   * @param {Sources["demo"]} files
   * @param {PageStore} store
   * @param {FilesPanel} filesPanel
   * @param {Messages} messages
   */
  constructor(files, store, filesPanel, messages) {
    this.files = files;
    this.store = store;
    this.filesPanel = filesPanel;
    this.messages = messages;
  }

  /**
   * Opens the bundled demo: footage, detections and, when `withPlan` or the user has no plan kept
   * from an earlier visit, its plan.
   * @param {boolean} withPlan
   */
  async open(withPlan) {
    if (!this.files) return;
    const get = this.files;
    try {
      const [footage, detections, planText] = await Promise.all([
        get("footage.webm"),
        get("detections.csv"),
        get("plan.json").then((b) => b.text()),
      ]);
      this.filesPanel.openFootage(footage, "demo footage.webm");
      await this.filesPanel.openDetections(await detections.arrayBuffer(), DEMO_DETECTIONS);
      if (withPlan || !this.store.restored) {
        this.store.planReplaced(parsePlanText(planText, "demo plan.json"), "demo", "demo plan.json");
        this.messages.clear("plan-replaced");
      }
      this.messages.say("demo", "ok", "This is the bundled demo: a simulated footbridge plaza. Press Run to track and count it, or open your own footage, detections and plan.");
      // Once it is counted (or other files are open) the invitation is out of date.
      const stop = this.store.subscribe(["results", "detections"], () => {
        this.messages.clear("demo");
        stop();
      });
    } catch (e) {
      this.messages.say("demo", "warn", `The demo could not be opened (${/** @type {Error} */ (e).message}). Open your own footage and detections.`);
    }
  }
}
