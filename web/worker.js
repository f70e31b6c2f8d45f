// @ts-check
// Runs the Throughline core (WebAssembly) off the page's main thread, so the page never freezes.
// A classic worker, not a module one: classic workers also start from a Blob URL, which the single-file
// build needs when the page is opened from disk. The single-file build puts wasm-bindgen's glue in front
// of this file; the site loads it from pkg/.
//
// The messages in and out are typed in js/protocol.js: a request {id, op, ...fields} is answered by
// {kind: "progress"} messages from operations that report progress (tracking, finding objects), then
// one {kind: "result"}, {kind: "error"} or {kind: "cancelled"}.
if (typeof wasm_bindgen === "undefined") importScripts("pkg/throughline_wasm.js");

/** @typedef {import("./js/protocol.js").RequestMessage} RequestMessage */
/** @typedef {import("./js/protocol.js").Reply} Reply */
/** @typedef {import("./js/protocol.js").FootageSearched} FootageSearched */
/** @typedef {import("./js/protocol.js").FootageUnread} FootageUnread */
/** @typedef {(done: number, total: number, stage?: string) => void} Progress */

/** Thrown where finding objects stops on request; answered as {kind: "cancelled"}. */
class FindCancelled extends Error {}

/** @type {wasm_bindgen.Session | null} */
let session = null;
let findCancelled = false;
/** Whether the session has tracks (of the detections it holds now). */
let tracked = false;

/** The core's session; operations other than init need it. */
function core() {
  if (!session) throw new Error("the engine is still starting");
  return session;
}

/** @param {Uint8Array} wasmBytes */
async function init(wasmBytes) {
  await wasm_bindgen({ module_or_path: wasmBytes });
  session = new wasm_bindgen.Session();
  return wasm_bindgen.coreFacts();
}

/**
 * Tracks the loaded detections; progress at most every 50 ms, and at the end.
 * @param {string} method
 * @param {string} settings
 * @param {Progress} progress
 */
function track(method, settings, progress) {
  const s = core();
  let last = 0;
  const n = s.track(method, settings, (done, total) => {
    const now = Date.now();
    if (now - last > 50 || done === total) {
      last = now;
      progress(done, total);
    }
  });
  tracked = true;
  return { tracks: n, boxes: s.allBoxes(), trackList: s.trackList() };
}

/**
 * Sets the person's corrections (an edits file, or a project file for its hand counts and
 * correction factor too) and counts again: the new counts and the tracks as edited.
 * @param {string} json
 * @param {"edits" | "project"} kind
 * @param {{width: number, height: number}} picture
 */
function setEdits(json, kind, picture) {
  const s = core();
  if (kind === "project") s.setWork(json);
  else s.setEdits(json);
  if (!tracked) return { results: null, tracks: null };
  const trackList = s.trackList();
  return { results: results(picture), tracks: { tracks: trackList.length, boxes: s.allBoxes(), trackList } };
}

/**
 * The hand-in tables of the last count, written by the core (CSV and tab-separated), and the stem
 * of their file names.
 * @param {import("./js/protocol.js").HandinContext} context
 * @returns {import("./js/protocol.js").HandIn}
 */
function handIn(context) {
  const s = core();
  /** @param {"wide" | "long"} layout */
  const grid = (layout) => ({ csv: s.intervalGrid(layout, "comma", context), tab: s.intervalGrid(layout, "tab", context) });
  const matrix = { csv: s.movementMatrix("comma", context), tab: s.movementMatrix("tab", context) };
  return { stem: s.fileStem(context), wide: grid("wide"), long: grid("long"), matrix };
}

/**
 * Does what `req` asks; its result goes back to the page as it is.
 * @param {RequestMessage} req
 * @param {Progress} progress
 */
async function perform(req, progress) {
  if (req.op !== "init") core(); // every other operation needs the core started
  switch (req.op) {
    case "init": return init(req.wasm);
    case "loadDetections": tracked = false; return core().loadDetections(new Uint8Array(req.bytes));
    case "setPlan": core().setPlan(req.json); return results(req);
    case "setEdits": return setEdits(req.json, req.kind, req);
    case "editsText": return core().editsText();
    case "readProject": return wasm_bindgen.readProject(req.text);
    case "writeProject": return wasm_bindgen.writeProject(req.project);
    case "fingerprint": return wasm_bindgen.fingerprint(req.name, req.size, new Uint8Array(req.head), req.duration);
    case "fingerprintDiffers": return wasm_bindgen.fingerprintDiffers(req.recorded, req.opened) || null;
    case "track": return track(req.method, req.settings, progress);
    case "startDetection": core().startDetection(req.width, req.height, req.settings); return true;
    case "detectRgba": return core().detectRgba(new Uint8Array(req.pixels), req.width, req.height);
    case "backgroundFrames": return Array.from(core().backgroundFrames(req.total));
    case "sampleRgba": core().sampleRgba(new Uint8Array(req.pixels), req.width, req.height); return null;
    case "finishDetection": tracked = false; return core().finishDetection();
    case "findInFootage": return findInFootage(req.footage, req.width, req.height, req.settings, req.expectedFrames, progress);
    case "cancelFind": findCancelled = true; return true;
    case "detectionsText": return core().detectionsText();
    case "tracksText": return core().tracksText();
    case "handIn": return handIn(req.context);
    case "summaryHtml": return core().summaryHtml(req.context);
    case "mergedGrid": return wasm_bindgen.mergedGrid(new Uint8Array(req.bytes), req.camera, req.class);
    default: throw new Error(`unknown operation ${/** @type {{op: string}} */ (req).op}`);
  }
}

/**
 * Finds moving objects in footage (a File or Blob) by decoding it here with WebCodecs: the core's
 * FootageReader reads the WebM or MP4 a range of bytes at a time, the browser's VideoDecoder
 * decodes, and each frame's own YUV bytes go to the motion detector (no drawing, no colour
 * conversion). Resolves to what was found, where `stopped` says why reading ended early (damaged
 * footage: the frames before are kept), or to {fallback: reason} when this footage or browser cannot
 * be read this way, before any frame is searched; the page then draws the frames one by one instead.
 * `expected` is the page's estimate of the number of frames, for progress.
 * @param {Blob} file
 * @param {number} width
 * @param {number} height
 * @param {string} settings detector settings JSON
 * @param {number} expected
 * @param {Progress} progress
 * @returns {Promise<FootageSearched | FootageUnread>}
 */
async function findInFootage(file, width, height, settings, expected, progress) {
  findCancelled = false;
  if (typeof VideoDecoder !== "function" || typeof FileReaderSync !== "function") {
    return { fallback: "this browser cannot decode video inside the page" };
  }
  const sync = new FileReaderSync();
  /** @type {(offset: number, length: number) => Uint8Array} */
  const readRange = (offset, length) => new Uint8Array(sync.readAsArrayBuffer(file.slice(offset, offset + length)));
  let reader;
  try {
    reader = new wasm_bindgen.FootageReader(readRange, file.size);
  } catch (e) {
    return { fallback: `the footage is ${messageOf(e)}` };
  }
  try {
    const info = reader.info();
    /** @type {VideoDecoderConfig} */
    const config = { codec: info.codec, codedWidth: info.codedWidth, codedHeight: info.codedHeight };
    if (info.description) config.description = info.description;
    const support = await VideoDecoder.isConfigSupported(config).catch(() => ({ supported: false }));
    if (!support.supported) return { fallback: "this browser cannot decode this video's format inside the page" };
    core().startDetection(width, height, settings);
    const total = info.frames || expected;
    if (core().wholeClipBackground()) {
      // A first reading for the background (pictures sampled over the whole clip), as the
      // command line reads a file: people in view at the start are found from the first frame.
      const first = new wasm_bindgen.FootageReader(readRange, file.size);
      try {
        const sampling = (/** @type {number} */ done, /** @type {number} */ n) => progress(done, n, "background");
        await decodeAndSearch(first, config, { width, height, total }, sampling, sampleFrame);
      } finally {
        first.free();
      }
    }
    const searched = await decodeAndSearch(reader, config, { width, height, total }, progress, searchFrame);
    return { summary: core().finishDetection(), codec: info.codec, container: info.container, expected: total, ...searched };
  } finally {
    reader.free();
  }
}

/**
 * What is done with each decoded frame: searched, or read for the background.
 * @typedef {(frame: VideoFrame, width: number, height: number, scratch: Scratch) => Promise<unknown>} FrameUse
 */

/**
 * Feeds the reader's coded frames to a VideoDecoder, a few at a time, and each decoded frame to
 * `use` (the motion detector, or its background), until the footage ends, the decoder fails, or
 * finding is cancelled.
 * @param {wasm_bindgen.FootageReader} reader
 * @param {VideoDecoderConfig} config
 * @param {{width: number, height: number, total: number}} size the page's size, frames expected
 * @param {Progress} progress
 * @param {FrameUse} use
 */
async function decodeAndSearch(reader, config, { width, height, total }, progress, use) {
  const feed = new DecoderFeed(reader, config);
  let done = 0;
  let last = 0;
  const times = []; // µs, of the first frames shown
  const scratch = new Scratch();
  try {
    for (;;) {
      if (findCancelled) throw new FindCancelled();
      if (feed.failure) {
        feed.stopped = feed.stopped || `the decoder stopped at frame ${done + 1}: ${feed.failure.message}`;
        break;
      }
      const frame = feed.waiting.shift();
      if (frame) {
        // Frames in flight: the decoder is kept fed (a few frames ahead) while this one is searched.
        while (feed.waiting.length < 4 && feed.step());
        if (times.length < 250) times.push(frame.timestamp);
        try {
          await use(frame, width, height, scratch);
        } finally {
          frame.close();
        }
        done++;
        const now = Date.now();
        if (now - last > 100) {
          last = now;
          progress(done, Math.max(total, done));
        }
      } else if (!feed.step()) {
        if (feed.flushed) break;
        await feed.wait();
      }
    }
  } finally {
    feed.close();
  }
  if (done === 0) throw new Error(feed.stopped || "the decoder gave no frames");
  progress(done, done);
  return { frames: done, stopped: feed.stopped, frameRate: frameRate(times) };
}

/** A VideoDecoder fed from a FootageReader, and the decoded frames waiting to be searched. */
class DecoderFeed {
  /**
   * @param {wasm_bindgen.FootageReader} reader
   * @param {VideoDecoderConfig} config
   */
  constructor(reader, config) {
    this.reader = reader;
    /** @type {VideoFrame[]} */
    this.waiting = [];
    /** @type {Error | null} */
    this.failure = null;
    /** @type {string | null} why reading stopped before the end (damaged footage) */
    this.stopped = null;
    this.fed = false;
    this.flushed = false;
    this.read = 0;
    /** @type {(() => void) | null} */
    this.wake = null;
    this.decoder = new VideoDecoder({
      output: (frame) => { this.waiting.push(frame); this.nudge(); },
      error: (e) => { this.failure = e; this.nudge(); },
    });
    this.decoder.addEventListener("dequeue", () => this.nudge());
    this.decoder.configure(config);
  }

  nudge() {
    const w = this.wake;
    this.wake = null;
    if (w) w();
  }

  /** Resolves when the decoder has something new: a frame, room for more, the end or a failure. */
  wait() {
    return new Promise((resolve) => { this.wake = () => resolve(undefined); });
  }

  /** Gives the decoder one more coded frame (or, at the end, flushes it); false when it has enough. */
  step() {
    if (this.fed || this.decoder.decodeQueueSize >= 4) return false;
    let chunk = null;
    try {
      chunk = this.reader.next();
    } catch (e) {
      // Damaged footage: search what was read before the damage, then stop.
      this.stopped = `${messageOf(e)} (after frame ${this.read})`;
    }
    if (chunk) {
      this.read++;
      this.decoder.decode(new EncodedVideoChunk({ type: chunk.key ? "key" : "delta", timestamp: chunk.timestamp, data: chunk.data }));
    } else {
      this.fed = true;
      this.decoder.flush().then(() => { this.flushed = true; this.nudge(); }, (e) => { this.failure = this.failure || e; this.nudge(); });
    }
    return true;
  }

  close() {
    for (const f of this.waiting) f.close();
    if (this.decoder.state !== "closed") this.decoder.close();
  }
}

/**
 * Frames a second from the median time between frames shown one after another (µs); null if unknown.
 * @param {number[]} times
 */
function frameRate(times) {
  const steps = times.slice(1).map((t, i) => t - times[i]).filter((d) => d > 0).sort((a, b) => a - b);
  return steps.length ? 1e6 / steps[steps.length >> 1] : null;
}

/** The byte buffer and the canvas kept from frame to frame. */
class Scratch {
  constructor() {
    this.bytes = new Uint8Array(0);
    /** @type {OffscreenCanvasRenderingContext2D | null} */
    this.g = null;
  }

  /**
   * A 2D context of this size for frames drawn as RGBA.
   * @param {number} width
   * @param {number} height
   */
  canvas(width, height) {
    if (!this.g) {
      const g = new OffscreenCanvas(width, height).getContext("2d", { willReadFrequently: true });
      if (!g) throw new Error("this browser cannot draw frames off screen");
      this.g = g;
    }
    return this.g;
  }
}

/**
 * One decoded frame to the detector: its own I420/NV12 bytes when it is the page's size, else
 * drawn as RGBA.
 * @param {VideoFrame} frame
 * @param {number} width
 * @param {number} height
 * @param {Scratch} scratch
 */
async function searchFrame(frame, width, height, scratch) {
  const pixels = await pixelsOf(frame, width, height, scratch);
  return pixels.layout === "RGBA"
    ? core().detectRgba(pixels.bytes, width, height)
    : core().detectYuv(pixels.bytes, width, height, pixels.layout);
}

/**
 * One decoded frame of the first reading to the detector's background, copied out only when it is
 * one the background keeps.
 * @param {VideoFrame} frame
 * @param {number} width
 * @param {number} height
 * @param {Scratch} scratch
 */
async function sampleFrame(frame, width, height, scratch) {
  if (!core().wantsSample()) return core().passSample();
  const pixels = await pixelsOf(frame, width, height, scratch);
  return pixels.layout === "RGBA"
    ? core().sampleRgba(pixels.bytes, width, height)
    : core().sampleYuv(pixels.bytes, width, height, pixels.layout);
}

/**
 * A decoded frame's pixels: its own I420/NV12 bytes when it is the page's size, else drawn as RGBA.
 * @param {VideoFrame} frame
 * @param {number} width
 * @param {number} height
 * @param {Scratch} scratch
 * @returns {Promise<{bytes: Uint8Array, layout: string}>}
 */
async function pixelsOf(frame, width, height, scratch) {
  const rect = frame.visibleRect;
  const direct = (frame.format === "I420" || frame.format === "NV12") && rect && rect.width === width && rect.height === height;
  if (direct) {
    const size = frame.allocationSize({ rect });
    if (scratch.bytes.length !== size) scratch.bytes = new Uint8Array(size);
    await frame.copyTo(scratch.bytes, { rect });
    return { bytes: scratch.bytes, layout: /** @type {string} */ (frame.format) };
  }
  const g = scratch.canvas(width, height);
  g.drawImage(frame, 0, 0, width, height);
  return { bytes: new Uint8Array(g.getImageData(0, 0, width, height).data.buffer), layout: "RGBA" };
}

/**
 * The report, counts CSV and doubtful moments when tracks and a plan are both there, otherwise null.
 * @param {{width: number, height: number}} picture the picture's size in pixels (0: unknown)
 */
function results({ width, height }) {
  let report;
  try {
    report = core().report();
  } catch (e) {
    return null;
  }
  return { report, csv: core().countsCsv(), doubts: core().doubts(width || 0, height || 0) };
}

/**
 * What went wrong, in words: an error's message, else the thing thrown.
 * @param {unknown} e
 */
function messageOf(e) {
  const message = e && typeof e === "object" && "message" in e ? e.message : undefined;
  return message ? String(message) : String(e);
}

/**
 * Answers the page.
 * @param {Reply} message
 * @param {Transferable[]} [transfer] buffers handed over with it
 */
function reply(message, transfer = []) {
  self.postMessage(message, transfer);
}

/**
 * The box arrays a result carries, to hand over rather than copy.
 * @param {unknown} result
 * @returns {Transferable[]}
 */
function boxesIn(result) {
  if (!result || typeof result !== "object") return [];
  if ("boxes" in result && result.boxes instanceof Float32Array) return [result.boxes.buffer];
  if ("tracks" in result && result.tracks && typeof result.tracks === "object") return boxesIn(result.tracks);
  return [];
}

self.onmessage = async (/** @type {MessageEvent<RequestMessage>} */ event) => {
  const req = event.data;
  const id = req.id;
  try {
    const result = await perform(req, (done, total, stage) => reply(stage ? { kind: "progress", id, done, total, stage } : { kind: "progress", id, done, total }));
    const transfer = boxesIn(result);
    reply({ kind: "result", id, result }, transfer);
  } catch (e) {
    if (e instanceof FindCancelled) reply({ kind: "cancelled", id });
    else reply({ kind: "error", id, message: messageOf(e) });
  }
};
