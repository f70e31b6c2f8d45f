// Runs the Throughline core (WebAssembly) off the page's main thread, so the page never freezes.
// A classic worker, not a module one: classic workers also start from a Blob URL, which the single-file
// build needs when the page is opened from disk. The single-file build puts wasm-bindgen's glue in front
// of this file; the site loads it from pkg/.
//
// Messages in: {id, op, args}. Messages out: {id, ok, result} or {id, ok: false, error}, and
// {id, progress: [done, total]} from operations that report progress (tracking, finding objects). Every operation
// is called with its arguments and then a `progress(done, total)` function for its own message.
/* global wasm_bindgen, importScripts */
if (typeof wasm_bindgen === "undefined") importScripts("pkg/throughline_wasm.js");

let session = null;
let findCancelled = false;

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
  findInFootage,
  cancelFind() {
    findCancelled = true;
    return true;
  },
  detectionsText() {
    return session.detectionsText();
  },
  tracksText() {
    return session.tracksText();
  },
};

/**
 * Finds moving objects in footage (a File or Blob) by decoding it here with WebCodecs: the core's
 * FootageReader reads the WebM or MP4 a range of bytes at a time, the browser's VideoDecoder
 * decodes, and each frame's own YUV bytes go to the motion detector (no drawing, no colour
 * conversion). Resolves to {summary, codec, container, frames, expected, stopped, frameRate},
 * where `stopped` says why reading ended early (damaged footage: the frames before are kept), or
 * to {fallback: reason} when this footage or browser cannot be read this way, before any frame is
 * searched; the page then draws the frames one by one instead. `expected` is the page's estimate
 * of the number of frames, for progress.
 */
async function findInFootage(file, width, height, settings, expected, progress) {
  findCancelled = false;
  if (typeof VideoDecoder !== "function" || typeof FileReaderSync !== "function") {
    return { fallback: "this browser has no WebCodecs video decoder" };
  }
  const sync = new FileReaderSync();
  const readRange = (offset, length) => new Uint8Array(sync.readAsArrayBuffer(file.slice(offset, offset + length)));
  let reader;
  try {
    reader = new wasm_bindgen.FootageReader(readRange, file.size);
  } catch (e) {
    return { fallback: `the footage is ${e.message}` };
  }
  try {
    return await decodeAndSearch(reader, width, height, settings, expected, progress);
  } finally {
    reader.free();
  }
}

async function decodeAndSearch(reader, width, height, settings, expected, progress) {
  const info = reader.info();
  const config = { codec: info.codec, codedWidth: info.codedWidth, codedHeight: info.codedHeight };
  if (info.description) config.description = info.description;
  const support = await VideoDecoder.isConfigSupported(config).catch(() => ({ supported: false }));
  if (!support.supported) return { fallback: `this browser cannot decode ${info.codec} itself` };

  session.startDetection(width, height, settings);
  const total = info.frames || expected;
  const waiting = [];
  let failure = null;
  let wake = null;
  const nudge = () => { if (wake) { const w = wake; wake = null; w(); } };
  const decoder = new VideoDecoder({
    output: (frame) => { waiting.push(frame); nudge(); },
    error: (e) => { failure = e; nudge(); },
  });
  decoder.addEventListener("dequeue", nudge);
  decoder.configure(config);
  let fed = false;
  let flushed = false;
  let stopped = null;
  let read = 0;
  const times = []; // µs, of the first frames shown

  let done = 0;
  let last = 0;
  const scratch = { bytes: null, canvas: null, g: null };
  try {
    for (;;) {
      if (findCancelled) throw new Error("cancelled; the detections opened before are kept");
      if (failure) {
        stopped = stopped || `the decoder stopped at frame ${done + 1}: ${failure.message}`;
        break;
      }
      if (waiting.length) {
        const frame = waiting.shift();
        if (times.length < 250) times.push(frame.timestamp);
        try {
          await searchFrame(frame, width, height, scratch);
        } finally {
          frame.close();
        }
        done++;
        const now = Date.now();
        if (now - last > 100) {
          last = now;
          progress(done, Math.max(total, done));
        }
        continue;
      }
      if (!fed && decoder.decodeQueueSize < 4) {
        let chunk = null;
        try {
          chunk = reader.next();
        } catch (e) {
          // Damaged footage: search what was read before the damage, then stop.
          stopped = `${e.message} (after frame ${read})`;
        }
        if (chunk) {
          read++;
          decoder.decode(new EncodedVideoChunk({ type: chunk.key ? "key" : "delta", timestamp: chunk.timestamp, data: chunk.data }));
        } else {
          fed = true;
          decoder.flush().then(() => { flushed = true; nudge(); }, (e) => { failure = failure || e; nudge(); });
        }
        continue;
      }
      if (flushed) break;
      await new Promise((resolve) => { wake = resolve; });
    }
  } finally {
    for (const f of waiting) f.close();
    if (decoder.state !== "closed") decoder.close();
  }
  if (done === 0) throw new Error(stopped || "the decoder gave no frames");
  progress(done, done);
  return { summary: session.finishDetection(), codec: info.codec, container: info.container, frames: done, expected: total, stopped, frameRate: frameRate(times) };
}

/** Frames a second from the median time between frames shown one after another (µs); null if unknown. */
function frameRate(times) {
  const steps = times.slice(1).map((t, i) => t - times[i]).filter((d) => d > 0).sort((a, b) => a - b);
  return steps.length ? 1e6 / steps[steps.length >> 1] : null;
}

/**
 * One decoded frame to the detector: its own I420/NV12 bytes when it is the page's size, else
 * drawn as RGBA. `scratch` keeps the byte buffer and the canvas from frame to frame.
 */
async function searchFrame(frame, width, height, scratch) {
  const rect = frame.visibleRect;
  const direct = (frame.format === "I420" || frame.format === "NV12") && rect.width === width && rect.height === height;
  if (direct) {
    const size = frame.allocationSize({ rect });
    if (!scratch.bytes || scratch.bytes.length !== size) scratch.bytes = new Uint8Array(size);
    await frame.copyTo(scratch.bytes, { rect });
    return session.detectYuv(scratch.bytes, width, height, frame.format);
  }
  if (!scratch.canvas) {
    scratch.canvas = new OffscreenCanvas(width, height);
    scratch.g = scratch.canvas.getContext("2d", { willReadFrequently: true });
  }
  scratch.g.drawImage(frame, 0, 0, width, height);
  return session.detectRgba(new Uint8Array(scratch.g.getImageData(0, 0, width, height).data.buffer), width, height);
}

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
