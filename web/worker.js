// Runs the Throughline core (WebAssembly) off the page's main thread, so the page never freezes.
// A classic worker, not a module one: classic workers also start from a Blob URL, which the single-file
// build needs when the page is opened from disk. The single-file build puts wasm-bindgen's glue in front
// of this file; the site loads it from pkg/.
//
// Messages in: {id, op, args}. Messages out: {id, ok, result} or {id, ok: false, error}, and
// {id, progress: [done, total]} from operations that report progress (tracking). Every operation
// is called with its arguments and then a `progress(done, total)` function for its own message.
/* global wasm_bindgen, importScripts */
if (typeof wasm_bindgen === "undefined") importScripts("pkg/throughline_wasm.js");

let session = null;

const ops = {
  async init(wasmBytes) {
    await wasm_bindgen({ module_or_path: wasmBytes });
    session = new wasm_bindgen.Session();
    return true;
  },
  loadDetections(bytes) {
    return session.loadDetections(new Uint8Array(bytes));
  },
  setPlan(json) {
    session.setPlan(json);
    return results();
  },
  track(method, settings, progress) {
    let last = 0;
    const n = session.track(method, settings, (done, total) => {
      const now = Date.now();
      if (now - last > 50 || done === total) {
        last = now;
        progress(done, total);
      }
    });
    return { tracks: n, boxes: session.allBoxes(), trackList: session.trackList() };
  },
  startDetection(width, height, settings) {
    session.startDetection(width, height, settings);
    return true;
  },
  detectRgba(pixels, width, height) {
    return session.detectRgba(new Uint8Array(pixels), width, height);
  },
  finishDetection() {
    return session.finishDetection();
  },
  detectionsText() {
    return session.detectionsText();
  },
  tracksText() {
    return session.tracksText();
  },
};

// The report and counts CSV when tracks and a plan are both there, otherwise null.
function results() {
  try {
    return { report: session.report(), csv: session.countsCsv() };
  } catch (e) {
    return null;
  }
}

self.onmessage = async (event) => {
  const { id, op, args } = event.data;
  try {
    if (!ops[op]) throw new Error(`unknown operation ${op}`);
    if (op !== "init" && !session) throw new Error("the engine is still starting");
    const progress = (done, total) => self.postMessage({ id, progress: [done, total] });
    const result = await ops[op](...args, progress);
    const transfer = result && result.boxes ? [result.boxes.buffer] : [];
    self.postMessage({ id, ok: true, result }, transfer);
  } catch (e) {
    self.postMessage({ id, ok: false, error: e && e.message ? e.message : String(e) });
  }
};
