// @ts-check
// The page's side of the worker that runs the core (worker.js): each operation is a typed request
// (protocol.js) answered by a promise; tracking and finding objects report progress on the way.

import { Cancelled } from "./protocol.js";

/** @typedef {import("./protocol.js").Request} Request */
/** @typedef {import("./protocol.js").ResultOf} ResultOf */
/** @typedef {import("./protocol.js").Reply} Reply */
/** @typedef {(done: number, total: number, stage?: string) => void} OnProgress */
/** @typedef {{resolve: (value: unknown) => void, reject: (error: Error) => void, onProgress: OnProgress | null}} Pending */

export class CoreClient {
  /**
   * Starts the worker at once and gives it the core as soon as `wasm()` has the bytes.
   * @param {() => Worker} makeWorker starts a Worker running worker.js
   * @param {() => Promise<Uint8Array>} wasm the core's WebAssembly
   */
  constructor(makeWorker, wasm) {
    this.makeWorker = makeWorker;
    this.wasm = wasm();
    this.nextId = 1;
    /** @type {Map<number, Pending>} */
    this.pending = new Map();
    this.worker = this.makeWorker();
    /** @type {import("./protocol.js").CoreFacts | null} the core's tables, once it has started */
    this.facts = null;
    /** Settles when the worker has started the core; rejects (with the reason) if it cannot. */
    this.ready = this.start();
  }

  /** Wires `this.worker` and gives it the core. */
  async start() {
    this.worker.onmessage = (event) => this.receive(event.data);
    this.worker.onerror = (event) => this.failAll(new Error(event.message || "the engine stopped"));
    const copy = (await this.wasm).slice();
    this.facts = await this.send({ op: "init", wasm: copy }, [copy.buffer]);
  }

  /** @param {Error} error */
  failAll(error) {
    for (const p of this.pending.values()) p.reject(error);
    this.pending.clear();
  }

  /**
   * Stops whatever the worker is doing by starting a fresh one: calls under way reject with
   * `Cancelled`, and everything the old worker held (detections, plan, tracks) is gone, so the page
   * gives it its detections and plan again. Resolves when the new one is up.
   */
  restart() {
    this.worker.terminate();
    this.failAll(new Cancelled());
    this.worker = this.makeWorker();
    this.ready = this.start();
    return this.ready;
  }

  /** @param {Reply} reply */
  receive(reply) {
    const p = this.pending.get(reply.id);
    if (!p) return;
    if (reply.kind === "progress") {
      if (p.onProgress) p.onProgress(reply.done, reply.total, reply.stage);
      return;
    }
    this.pending.delete(reply.id);
    if (reply.kind === "result") p.resolve(reply.result);
    else if (reply.kind === "cancelled") p.reject(new Cancelled());
    else p.reject(new Error(reply.message));
  }

  /**
   * Posts a request now; resolves to its result.
   * @template {Request["op"]} K
   * @param {Extract<Request, {op: K}>} request
   * @param {Transferable[]} [transfer] buffers handed over to the worker
   * @param {OnProgress | null} [onProgress]
   * @returns {Promise<ResultOf[K]>}
   */
  send(request, transfer = [], onProgress = null) {
    const id = this.nextId++;
    return new Promise((resolve, reject) => {
      this.pending.set(id, { resolve: /** @type {(value: unknown) => void} */ (resolve), reject, onProgress });
      this.worker.postMessage({ ...request, id }, transfer);
    });
  }

  /**
   * Posts a request once the worker is ready.
   * @template {Request["op"]} K
   * @param {Extract<Request, {op: K}>} request
   * @param {Transferable[]} [transfer]
   * @param {OnProgress | null} [onProgress]
   * @returns {Promise<ResultOf[K]>}
   */
  async call(request, transfer = [], onProgress = null) {
    await this.ready;
    return this.send(request, transfer, onProgress);
  }

  /**
   * Reads a detections file (the buffer is handed over); resolves to its summary.
   * @param {ArrayBuffer} bytes
   */
  loadDetections(bytes) {
    return this.call({ op: "loadDetections", bytes }, [bytes]);
  }

  /**
   * Checks and sets the plan (JSON text) and the footage's duration; resolves to the report, CSV
   * and doubtful moments when tracks exist, else null.
   * @param {string} json
   * @param {{width: number, height: number} | null} picture the picture's size (for the doubtful moments)
   * @param {number} footageSeconds the duration of the footage the work is on, as its
   *   fingerprint records it (0: none): detections from a file that end before it are counted to
   *   its end at the plan's frame rate, as `throughline run --edits PROJECT` counts them
   */
  setPlan(json, picture, footageSeconds) {
    return this.call({ op: "setPlan", json, ...sizeOf(picture), footageSeconds });
  }

  /**
   * The plan's lines and zones lying wholly outside the picture, named ("line `a`").
   * @param {{width: number, height: number}} picture
   * @returns {Promise<string[]>}
   */
  planOutsidePicture(picture) {
    return this.call({ op: "planOutsidePicture", ...sizeOf(picture) });
  }

  /**
   * Sets the person's corrections and counts again; resolves to the counts and the edited tracks.
   * @param {string} json an edits file, or a project file (`kind` "project": its hand counts and correction factor too)
   * @param {"edits" | "project"} kind
   * @param {{width: number, height: number} | null} picture
   */
  setEdits(json, kind, picture) {
    return this.call({ op: "setEdits", json, kind, ...sizeOf(picture) });
  }

  /**
   * The tracks' paths as the counting sees them under the plan (averaged count points, one a
   * frame): a Map id -> path.
   * @param {number[]} ids
   * @returns {Promise<Map<number, import("./tracks.js").Path>>}
   */
  async countedPaths(ids) {
    const values = await this.call({ op: "countedPaths", ids });
    /** @type {Map<number, import("./tracks.js").Path>} */
    const out = new Map();
    for (let o = 0; o + 5 <= values.length; o += 5) {
      let path = out.get(values[o]);
      if (!path) out.set(values[o], (path = { pts: [], seen: [] }));
      path.pts.push([values[o + 2], values[o + 3]]);
      path.seen.push(values[o + 4] > 0);
    }
    return out;
  }

  /** The corrections as an edits file, written by the core. */
  editsText() {
    return this.call({ op: "editsText" });
  }

  /**
   * Checks a plan file's text as the command line reads it; rejects with what is wrong where
   * (the line and column in that text).
   * @param {string} text
   */
  checkPlan(text) {
    return this.call({ op: "checkPlan", text });
  }

  /**
   * Reads a project file: the project and how its version differs from this one's (the core
   * decides); rejects with what is wrong where.
   * @param {string} text
   */
  readProject(text) {
    return this.call({ op: "readProject", text });
  }

  /**
   * The project file's text for a project object (checked against its layout by the core).
   * @param {object} project
   */
  writeProject(project) {
    return this.call({ op: "writeProject", project });
  }

  /**
   * A file's fingerprint: its name, size, the SHA-256 of its first MiB and, for footage, its duration.
   * @param {string} name
   * @param {Blob} file
   * @param {number} duration seconds, 0 when none
   */
  async fingerprint(name, file, duration) {
    const head = await file.slice(0, 1 << 20).arrayBuffer();
    return this.call({ op: "fingerprint", name, size: file.size, head, duration }, [head]);
  }

  /**
   * What the footage's container tells as it opens: the frames a second it is coded at (its
   * first frames' times), and why it is cut short, where it says so (each null where unknown).
   * @param {Blob} footage
   * @returns {Promise<{rate: number | null, cut: string | null}>}
   */
  footageFacts(footage) {
    return this.call({ op: "footageFacts", footage });
  }

  /**
   * A merged counts file (throughline batch) as the interval grid of one camera and class.
   * @param {Blob} file
   * @param {string} camera "" for the first
   * @param {string} cls "" for all classes summed
   * @returns {Promise<import("./protocol.js").MergedGrid>}
   */
  async mergedGrid(file, camera, cls) {
    const bytes = await file.arrayBuffer();
    return this.call({ op: "mergedGrid", bytes, camera, class: cls }, [bytes]);
  }

  /**
   * Why the file opened is not the one a project recorded, in a sentence; null when it is.
   * @param {object} recorded
   * @param {object} opened
   */
  fingerprintDiffers(recorded, opened) {
    return this.call({ op: "fingerprintDiffers", recorded, opened });
  }

  /**
   * Tracks the loaded detections with `method` ("" for the best for them); when the settings
   * bridge missed detections and `footage` is given, the worker reads it again to bridge them
   * (progress stage "bridging").
   * @param {string} method
   * @param {string} settings tracker settings JSON, "" for the method's defaults
   * @param {import("./protocol.js").TrackFootage | null} footage
   * @param {OnProgress} onProgress
   */
  track(method, settings, footage, onProgress) {
    return this.call({ op: "track", method, settings, footage }, [], onProgress);
  }

  /**
   * Starts the motion detector for footage of this size.
   * @param {number} width
   * @param {number} height
   * @param {string} settings detector settings JSON (docs/detector-settings.md)
   */
  startDetection(width, height, settings) {
    return this.call({ op: "startDetection", width, height, settings });
  }

  /**
   * Finds moving objects in footage (WebM or MP4) by decoding it in the worker (WebCodecs). Resolves
   * to what was found, or to `{fallback: reason}` when the worker cannot decode it; rejects with
   * `Cancelled` after `cancelFind`.
   * @param {Blob} footage
   * @param {number} width
   * @param {number} height
   * @param {string} settings detector settings JSON
   * @param {number} expectedFrames the page's estimate, for progress
   * @param {OnProgress} onProgress
   */
  findInFootage(footage, width, height, settings, expectedFrames, onProgress) {
    return this.call({ op: "findInFootage", footage, width, height, settings, expectedFrames }, [], onProgress);
  }

  /** Stops findInFootage at the next frame. */
  cancelFind() {
    return this.call({ op: "cancelFind" });
  }

  /**
   * One frame's RGBA pixels (the buffer is handed over); resolves to the number of objects found.
   * @param {ArrayBuffer} pixels
   * @param {number} width
   * @param {number} height
   */
  detectRgba(pixels, width, height) {
    return this.call({ op: "detectRgba", pixels, width, height }, [pixels]);
  }

  /**
   * For frames drawn here: whether the clip is read once for its background first, and which
   * frames of that reading it keeps (`frames` of `total`, from 1), so only those are drawn.
   * @param {number} total
   */
  backgroundFrames(total) {
    return this.call({ op: "backgroundFrames", total });
  }

  /**
   * One frame of the first reading as RGBA pixels (the buffer is handed over).
   * @param {ArrayBuffer} pixels
   * @param {number} width
   * @param {number} height
   */
  sampleRgba(pixels, width, height) {
    return this.call({ op: "sampleRgba", pixels, width, height }, [pixels]);
  }

  /** The found boxes become the detections; resolves to their summary. */
  finishDetection() {
    return this.call({ op: "finishDetection" });
  }

  /** The detections as a file: CSV when they carry classes or appearance vectors, else plain rows. */
  detectionsText() {
    return this.call({ op: "detectionsText" });
  }

  /** The last tracks, as the command line's --tracks file. */
  tracksText() {
    return this.call({ op: "tracksText" });
  }

  /**
   * The hand-in tables of the last count (interval grid, movement matrix) and their file names' stem.
   * @param {import("./protocol.js").HandinContext} context
   */
  handIn(context) {
    return this.call({ op: "handIn", context });
  }

  /**
   * The client summary of the last count, as a printable HTML page.
   * @param {import("./protocol.js").HandinContext} context with the still, when there is one
   */
  summaryHtml(context) {
    return this.call({ op: "summaryHtml", context });
  }
}

/**
 * The picture's size for a request (0 × 0 when not known yet).
 * @param {{width: number, height: number} | null} picture
 */
function sizeOf(picture) {
  return picture ? { width: picture.width, height: picture.height } : { width: 0, height: 0 };
}
