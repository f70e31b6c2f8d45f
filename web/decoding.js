// @ts-check
// Decoding footage in the worker (WebCodecs), for finding objects and for bridging missed
// detections: the core's FootageReader reads the WebM or MP4 a range of bytes at a time, the
// browser's VideoDecoder decodes, and each decoded frame goes to a function of worker.js. A second
// classic script of the same worker, after worker.js: `cargo xtask site` writes the two as one
// worker.js (the single-file build needs one script), so they share one global scope.

/** Thrown where finding objects stops on request; answered as {kind: "cancelled"}. */
class FindCancelled extends Error {}

/**
 * Footage opened for WebCodecs: a reader at its first frame, what the reader says of it, the
 * decoder's configuration, and `again()` for another reader from the start.
 * @typedef {object} OpenedFootage
 * @property {wasm_bindgen.FootageReader} reader
 * @property {ReturnType<wasm_bindgen.FootageReader["info"]>} info
 * @property {VideoDecoderConfig} config
 * @property {() => wasm_bindgen.FootageReader} again
 * @property {number | null} rate frames a second it is coded at, from its first frames' times (null: unknown)
 */

/**
 * Opens footage (a File or Blob) for decoding here: the core's FootageReader reads the WebM or MP4
 * a range of bytes at a time, and the browser must be able to decode its video. Resolves to
 * {fallback: reason} when this footage or browser cannot be read this way.
 * @param {Blob} file
 * @returns {Promise<OpenedFootage | FootageUnread>}
 */
async function openFootage(file) {
  if (typeof VideoDecoder !== "function" || typeof FileReaderSync !== "function") {
    return { fallback: "this browser cannot decode video inside the page" };
  }
  const sync = new FileReaderSync();
  /** @type {(offset: number, length: number) => Uint8Array} */
  const readRange = (offset, length) => new Uint8Array(sync.readAsArrayBuffer(file.slice(offset, offset + length)));
  const again = () => new wasm_bindgen.FootageReader(readRange, file.size);
  let reader;
  try {
    reader = again();
  } catch (e) {
    return { fallback: `the footage is ${messageOf(e)}` };
  }
  try {
    const info = reader.info();
    /** @type {VideoDecoderConfig} */
    const config = { codec: info.codec, codedWidth: info.codedWidth, codedHeight: info.codedHeight };
    if (info.description) config.description = info.description;
    const support = await VideoDecoder.isConfigSupported(config).catch(() => ({ supported: false }));
    if (!support.supported) {
      reader.free();
      return { fallback: "this browser cannot decode this video's format inside the page" };
    }
    return { reader, info, config, again, rate: codedRate(again) };
  } catch (e) {
    reader.free();
    throw e;
  }
}

/**
 * What is done with each decoded frame: searched, read for the background, or fed to bridging.
 * @typedef {(frame: VideoFrame, width: number, height: number, scratch: Scratch) => Promise<unknown>} FrameUse
 */

/**
 * Feeds the reader's coded frames to a VideoDecoder, a few at a time, and each decoded frame to
 * `use` (the motion detector, its background, or bridging), until the footage ends, `until` frames
 * were used, the decoder fails, or `cancelled()` says so (checked between frames; then it throws
 * FindCancelled).
 * @param {wasm_bindgen.FootageReader} reader
 * @param {VideoDecoderConfig} config
 * @param {{width: number, height: number, total: number, until?: number, rate: number | null}} size the page's size, frames
 *   expected, frames wanted (all when absent), and the rate the footage is coded at (frames missing
 *   from it are filled: {@link FrameGaps})
 * @param {Progress} progress
 * @param {FrameUse} use
 * @param {() => boolean} cancelled whether the request decoding for was cancelled
 */
async function decodeAndSearch(reader, config, { width, height, total, until = Infinity, rate }, progress, use, cancelled) {
  const feed = new DecoderFeed(reader, config);
  const gaps = new FrameGaps(rate);
  /** @type {VideoFrame | null} the frame decoded before this one (it fills missing frames) */
  let before = null;
  let done = 0;
  let last = 0;
  const times = []; // µs, of the first frames shown
  const scratch = new Scratch();
  try {
    for (;;) {
      if (cancelled()) throw new FindCancelled();
      if (feed.failure) {
        feed.stopped = feed.stopped || `the decoder stopped at frame ${done + 1}: ${feed.failure.message}`;
        break;
      }
      const frame = feed.waiting.shift();
      if (frame) {
        // Frames in flight: the decoder is kept fed (a few frames ahead) while this one is searched.
        while (feed.waiting.length < 4 && feed.step());
        if (times.length < 250) times.push(frame.timestamp);
        const { previous, current } = gaps.uses(frame.timestamp);
        try {
          for (let k = 0; k < previous + current && done < until; k++) {
            await use(k < previous && before ? before : frame, width, height, scratch);
            done++;
          }
        } finally {
          if (before) before.close();
          before = frame;
        }
        if (done >= until) break;
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
    if (before) before.close();
    feed.close();
  }
  if (done === 0) throw new Error(feed.stopped || "the decoder gave no frames");
  progress(done, done);
  return { frames: done, stopped: feed.stopped, frameRate: frameRate(times), filled: gaps.filled };
}

/**
 * Frames missing from footage (recorded at a variable frame rate, or dropped by a camera or a
 * recorder) filled as ffmpeg fills them when it makes a constant frame rate (`-vsync cfr`,
 * FFmpeg 5.1's rule, for a gap of whole frames): a frame coming k + 1 frames after the one before
 * is used k + 1 times, the frame before filling the first k − 1 of the places missed. So frame
 * numbers follow the footage's clock, and boxes the page finds are numbered as `throughline detect`
 * numbers ffmpeg's frames. Each gap is measured against the frame before it (not a clock from the
 * start), so a rate known only roughly (from timestamps in whole milliseconds) never adds frames.
 */
class FrameGaps {
  /** @param {number | null} rate frames a second the footage is coded at (null: nothing filled) */
  constructor(rate) {
    this.step = rate ? 1e6 / rate : 0;
    /** @type {number | null} µs */
    this.last = null;
    /** Places filled beyond one a frame. */
    this.filled = 0;
  }

  /**
   * How many times to use the frame before (for the places missed) and this one.
   * @param {number} timestamp µs
   */
  uses(timestamp) {
    const since = this.last === null ? 0 : timestamp - this.last;
    this.last = timestamp;
    if (!this.step || since <= 0) return { previous: 0, current: 1 };
    // ffmpeg's delta (the places from the frame before to the end of this one) and delta0.
    const delta = since / this.step;
    if (delta <= 1.1) return { previous: 0, current: 1 };
    const places = roundHalfEven(delta);
    const previous = delta - 1 > 1.1 ? roundHalfEven(delta - 1.6) : 0;
    this.filled += places - 1;
    return { previous, current: places - previous };
  }
}

/**
 * The nearest whole number, halves to the even one (C's `llrint` in its default rounding).
 * @param {number} x
 */
function roundHalfEven(x) {
  const r = Math.round(x);
  return r - x === 0.5 && r % 2 !== 0 ? r - 1 : r;
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
 * What a footage's container tells as soon as it is opened, read and not decoded: the frames a
 * second it is coded at, from its first frames' times (a plan at another rate is offered the
 * footage's before anything is counted: a newcomer's re-trial counted brought detections at 25 a
 * second on 10 fps footage, never played), and why it is cut short where the container says so
 * (a WebM cut short played to its cut without a word). Nulls where the page cannot read the
 * footage this way.
 * @param {Blob} file
 * @returns {Promise<{rate: number | null, cut: string | null}>}
 */
async function footageFacts(file) {
  const opened = await openFootage(file);
  if ("fallback" in opened) return { rate: null, cut: null };
  const cut = opened.reader.cutShort() || null;
  opened.reader.free();
  return { rate: opened.rate, cut };
}

/**
 * Frames a second a footage is coded at, from its first 60 frames' times read by a reader of its
 * own (not decoded); null where unknown.
 * @param {() => wasm_bindgen.FootageReader} again
 */
function codedRate(again) {
  const reader = again();
  /** @type {number[]} */
  const times = [];
  try {
    for (let k = 0; k < 60; k++) {
      const chunk = reader.next();
      if (!chunk) break;
      times.push(chunk.timestamp);
    }
  } catch (e) {
    // Damaged early: the times read so far.
  } finally {
    reader.free();
  }
  // Coded order is not shown order where frames refer forward (H.264's B-frames).
  return frameRate(times.sort((a, b) => a - b));
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
