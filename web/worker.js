// @ts-check
// Runs the Throughline core (WebAssembly) off the page's main thread, so the page never freezes.
// A classic worker, not a module one: classic workers also start from a Blob URL, which the single-file
// build needs when the page is opened from disk. The single-file build puts wasm-bindgen's glue in front
// of this file; the site loads it from pkg/. Decoding footage (decoding.js) is a second script of the
// same worker: `cargo xtask site` writes the two as one worker.js.
//
// The messages in and out are typed in js/protocol.js: a request {id, op, ...fields} is answered by
// {kind: "progress"} messages from operations that report progress (tracking, finding objects), then
// one {kind: "result"}, {kind: "error"} or {kind: "cancelled"}.
if (typeof wasm_bindgen === "undefined") importScripts("pkg/throughline_wasm.js");

/** @typedef {import("./js/protocol.js").RequestMessage} RequestMessage */
/** @typedef {import("./js/protocol.js").Reply} Reply */
/** @typedef {import("./js/protocol.js").FootageSearched} FootageSearched */
/** @typedef {import("./js/protocol.js").FootageUnread} FootageUnread */
/** @typedef {import("./js/protocol.js").TrackFootage} TrackFootage */
/** @typedef {(done: number, total: number, stage?: string) => void} Progress */

/** @type {wasm_bindgen.Session | null} */
let session = null;
/** Whether the session has tracks (of the detections it holds now). */
let tracked = false;
/**
 * Settled when the last tracking request to arrive has ended. Bridging awaits the decoder, so other
 * requests could come in between: each waits for the tracking asked for before it (the promise is
 * taken and replaced when a message arrives, so in the order they came), and so never sees tracks
 * not yet bridged.
 * @type {Promise<unknown>}
 */
let tracking = Promise.resolve();
/** The latest Find moving objects request's cancel token, made when the request arrives. @type {{cancelled: boolean}} */
let findToken = { cancelled: false };

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
 * Tracks the loaded detections; progress at most every 50 ms, and at the end. With footage and
 * settings that bridge missed detections, the tracks are then bridged with it (`bridge`).
 * @param {string} method
 * @param {string} settings
 * @param {TrackFootage | null} footage
 * @param {Progress} progress
 * @returns {Promise<import("./js/protocol.js").Tracked>}
 */
async function track(method, settings, footage, progress) {
  const s = core();
  let last = 0;
  s.track(method, settings, (done, total) => {
    const now = Date.now();
    if (now - last > 50 || done === total) {
      last = now;
      progress(done, total);
    }
  });
  tracked = true;
  const bridged = await bridge(footage, progress);
  const trackList = s.trackList();
  // The tracker's own count; the list is after the person's corrections, when there are some.
  return { tracks: s.trackedCount(), boxes: s.allBoxes(), trackList, bridged };
}

/**
 * Bridges the tracks just made across missed detections when their settings ask for it and footage
 * is open, as `throughline run --y4m` does: the footage is decoded again as for finding objects, up
 * to the last frame a gap needs, and each frame's luma plane goes to the core's FootageBridge, which
 * then makes the bridged tracks the session's. Resolves to what it did, to {skipped: why} when the
 * footage cannot be decoded here (the tracks stay as tracked), or to null when nothing is bridged.
 * Whenever no footage bridges them, the tracks' settings say so (`notBridged`), as the command
 * line's report does without --y4m.
 * @param {TrackFootage | null} footage
 * @param {Progress} progress
 * @returns {Promise<import("./js/protocol.js").Bridged>}
 */
async function bridge(footage, progress) {
  if (!footage) {
    core().notBridged();
    return null;
  }
  let bridger;
  try {
    bridger = core().startBridging(footage.width, footage.height);
  } catch (e) {
    core().notBridged();
    return { skipped: messageOf(e) }; // the tracks stay as tracked, here as on the page
  }
  if (!bridger) return null;
  /** @type {string | null} why reading the footage stopped early (damaged footage) */
  let stopped = null;
  try {
    const last = bridger.lastFrameNeeded();
    if (last > 0) {
      const opened = await openFootage(footage.file);
      if ("fallback" in opened) {
        bridger.free();
        core().notBridged();
        return { skipped: opened.fallback };
      }
      try {
        let frame = 0;
        /** @type {FrameUse} */
        const feed = async (decoded, width, height, scratch) => {
          const pixels = await pixelsOf(decoded, width, height, scratch);
          frame++;
          if (pixels.layout === "RGBA") bridger.feedRgba(frame, pixels.bytes);
          else bridger.feed(frame, pixels.bytes.subarray(0, width * height));
        };
        const size = { width: footage.width, height: footage.height, total: last, until: last, rate: opened.rate };
        // Not cancelled from the page: Cancel on Run replaces the worker.
        const searched = await decodeAndSearch(opened.reader, opened.config, size, (done, n) => progress(done, n, "bridging"), feed, () => false);
        stopped = searched.stopped;
      } finally {
        opened.reader.free();
      }
    }
  } catch (e) {
    bridger.free();
    core().notBridged();
    return { skipped: messageOf(e) };
  }
  const summary = bridger.finish(core());
  return stopped ? { ...summary, stopped } : summary;
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
 * @param {{cancelled: boolean}} token this request's cancel token (Find moving objects')
 */
async function perform(req, progress, token) {
  if (req.op !== "init") core(); // every other operation needs the core started
  switch (req.op) {
    case "init": return init(req.wasm);
    case "loadDetections": tracked = false; return core().loadDetections(new Uint8Array(req.bytes));
    case "setPlan": core().setFootageSeconds(req.footageSeconds); core().setPlan(req.json); return results(req);
    case "setEdits": return setEdits(req.json, req.kind, req);
    case "editsText": return core().editsText();
    case "readProject": return wasm_bindgen.readProject(req.text);
    case "checkPlan": wasm_bindgen.checkPlan(req.text); return true;
    case "planOutsidePicture": return core().planOutsidePicture(req.width, req.height);
    case "writeProject": return wasm_bindgen.writeProject(req.project);
    case "fingerprint": return wasm_bindgen.fingerprint(req.name, req.size, new Uint8Array(req.head), req.duration);
    case "fingerprintDiffers": return wasm_bindgen.fingerprintDiffers(req.recorded, req.opened) || null;
    case "track": return track(req.method, req.settings, req.footage, progress);
    case "startDetection": core().startDetection(req.width, req.height, req.settings); return true;
    case "detectRgba": return core().detectRgba(new Uint8Array(req.pixels), req.width, req.height);
    case "backgroundFrames": return Array.from(core().backgroundFrames(req.total));
    case "sampleRgba": core().sampleRgba(new Uint8Array(req.pixels), req.width, req.height); return null;
    case "finishDetection": tracked = false; return core().finishDetection();
    case "findInFootage": return findInFootage(req.footage, req.width, req.height, req.settings, req.expectedFrames, progress, token);
    case "cancelFind": findToken.cancelled = true; return true;
    case "detectionsText": return core().detectionsText();
    case "tracksText": return core().tracksText();
    case "handIn": return handIn(req.context);
    case "summaryHtml": return core().summaryHtml(req.context);
    case "countedPaths": return core().countedPaths(new Uint32Array(req.ids));
    case "mergedGrid": return wasm_bindgen.mergedGrid(new Uint8Array(req.bytes), req.camera, req.class);
    case "footageFacts": return footageFacts(req.footage);
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
 * @param {{cancelled: boolean}} token set by the page's Cancel of this request
 * @returns {Promise<FootageSearched | FootageUnread>}
 */
async function findInFootage(file, width, height, settings, expected, progress, token) {
  const cancelled = () => token.cancelled;
  const opened = await openFootage(file);
  if ("fallback" in opened) return opened;
  const { reader, info, config } = opened;
  try {
    core().startDetection(width, height, settings);
    const total = info.frames || expected;
    if (core().wholeClipBackground()) {
      // A first reading for the background (pictures sampled over the whole clip), as the
      // command line reads a file: people in view at the start are found from the first frame.
      const first = opened.again();
      try {
        const sampling = (/** @type {number} */ done, /** @type {number} */ n) => progress(done, n, "background");
        await decodeAndSearch(first, config, { width, height, total, rate: opened.rate }, sampling, sampleFrame, cancelled);
      } finally {
        first.free();
      }
    }
    const searched = await decodeAndSearch(reader, config, { width, height, total, rate: opened.rate }, progress, searchFrame, cancelled);
    return { summary: core().finishDetection(), codec: info.codec, container: info.container, expected: total, ...searched };
  } finally {
    reader.free();
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
  // Cancel acts at once, on the Find asked for last; the others wait for the tracking asked for
  // before them, and a track request makes the next requests wait for it.
  const token = req.op === "findInFootage" ? (findToken = { cancelled: false }) : findToken;
  const previous = req.op === "cancelFind" ? Promise.resolve() : tracking;
  let release = () => {};
  if (req.op === "track") tracking = new Promise((resolve) => { release = () => resolve(undefined); });
  try {
    await previous;
    const result = await perform(req, (done, total, stage) => reply(stage ? { kind: "progress", id, done, total, stage } : { kind: "progress", id, done, total }), token);
    const transfer = boxesIn(result);
    reply({ kind: "result", id, result }, transfer);
  } catch (e) {
    if (e instanceof FindCancelled) reply({ kind: "cancelled", id });
    else reply({ kind: "error", id, message: messageOf(e) });
  } finally {
    release();
  }
};
