// The page's side of the worker: each call returns a promise; tracking reports progress.

export class Engine {
  /** `makeWorker()` starts a Worker running worker.js; `wasmBytes` is the core's WebAssembly. */
  constructor(makeWorker, wasmBytes) {
    this.makeWorker = makeWorker;
    this.wasmBytes = wasmBytes;
    this.nextId = 1;
    this.pending = new Map();
    this.start();
  }

  start() {
    const worker = this.makeWorker();
    this.worker = worker;
    worker.onmessage = (event) => this.receive(event.data);
    worker.onerror = (event) => this.failAll(event.message || "the engine stopped");
    const copy = this.wasmBytes.slice();
    this.ready = this.call("init", [copy], [copy.buffer]);
  }

  failAll(message) {
    for (const p of this.pending.values()) p.reject(new Error(message));
    this.pending.clear();
  }

  /**
   * Stops whatever the engine is doing by starting a fresh worker: calls under way reject with a
   * message starting "cancelled", and everything the old worker held (detections, plan, tracks)
   * is gone, so the page gives it its detections and plan again. Resolves when the new one is up.
   */
  restart() {
    this.worker.terminate();
    this.failAll("cancelled");
    this.start();
    return this.ready;
  }

  receive(data) {
    const p = this.pending.get(data.id);
    if (!p) return;
    if (data.progress) {
      if (p.onProgress) p.onProgress(data.progress[0], data.progress[1]);
      return;
    }
    this.pending.delete(data.id);
    if (data.ok) p.resolve(data.result);
    else p.reject(new Error(data.error));
  }

  call(op, args, transfer = [], onProgress = null) {
    const id = this.nextId++;
    return new Promise((resolve, reject) => {
      this.pending.set(id, { resolve, reject, onProgress });
      this.worker.postMessage({ id, op, args }, transfer);
    });
  }

  /** Reads a detections file; resolves to its summary (rows, frames, format, warnings, max_x, max_y). */
  async loadDetections(bytes) {
    await this.ready;
    return this.call("loadDetections", [bytes], [bytes]);
  }

  /** Checks and sets the plan; resolves to {report, csv} when tracks exist, else null. */
  async setPlan(json) {
    await this.ready;
    return this.call("setPlan", [json]);
  }

  /** Tracks the loaded detections; resolves to {tracks, boxes: Float32Array, trackList}. */
  async track(method, settings, onProgress) {
    await this.ready;
    return this.call("track", [method, settings], [], onProgress);
  }

  /** Starts the motion detector for footage of this size; `settings` is detector settings JSON. */
  async startDetection(width, height, settings) {
    await this.ready;
    return this.call("startDetection", [width, height, settings]);
  }

  /**
   * Finds moving objects in `footage` (a File or Blob, WebM or MP4) by decoding it in the worker
   * (WebCodecs). Resolves to {summary, codec, container, frames}, or to {fallback: reason} when it
   * cannot be decoded there; `onProgress(done, total)` as frames are searched.
   */
  async findInFootage(footage, width, height, settings, expectedFrames, onProgress) {
    await this.ready;
    return this.call("findInFootage", [footage, width, height, settings, expectedFrames], [], onProgress);
  }

  /** Stops findInFootage at the next frame; it then rejects with a message starting "cancelled". */
  cancelFind() {
    return this.call("cancelFind", []);
  }

  /** One frame's RGBA pixels (the buffer is handed over); resolves to the number of objects found. */
  detectRgba(pixels, width, height) {
    return this.call("detectRgba", [pixels, width, height], [pixels]);
  }

  /** The found boxes become the detections; resolves to their summary, as loadDetections. */
  finishDetection() {
    return this.call("finishDetection", []);
  }

  detectionsText() {
    return this.call("detectionsText", []);
  }

  async tracksText() {
    await this.ready;
    return this.call("tracksText", []);
  }
}
