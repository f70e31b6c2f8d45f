// @ts-check
// The messages between the page and the worker that runs the core (worker.js, client in
// core-client.js). The page sends a request: an operation (`op`) with its fields and an id. The worker
// answers that id with any number of progress messages, then exactly one result, error or
// cancelled message. Both sides tell messages apart by their `kind` and `op`, never by their text.
// This module holds no DOM and no worker code, so both the page and the worker can name its types.

/**
 * What the core found in a detections file or in footage (crate/wasm/src/lib.rs, DetectionSummary).
 * @typedef {object} DetectionSummary
 * @property {number} rows boxes read
 * @property {number} frames the last frame number (1-based)
 * @property {string} format
 * @property {string[]} classes
 * @property {number} embedding_dim
 * @property {number} skipped_rows
 * @property {string[]} warnings "line N: message" for rows passed over, and other notes
 * @property {number} max_x the largest right edge of any box, in pixels
 * @property {number} max_y the largest bottom edge of any box, in pixels
 */

/** @typedef {{id: number, class: string | null, first_frame: number, last_frame: number}} TrackInfo */

/**
 * Tracks for drawing: `boxes` holds 7 values per box (frame 1-based, id, x, y, w, h in pixels
 * top-left + size, observed 1/0), ordered by frame (crate/wasm/src/lib.rs, allBoxes).
 * @typedef {{tracks: number, boxes: Float32Array, trackList: TrackInfo[]}} TrackOutput
 */

/** The report (JSON text) and counts CSV, exactly as the command line writes them. @typedef {{report: string, csv: string}} Results */

/**
 * Footage searched in the worker: the detections' summary, how the footage was read, the frames
 * searched and expected, why reading `stopped` early (null: it did not) and the frame rate the
 * footage's own times give (null: unknown).
 * @typedef {object} FootageSearched
 * @property {DetectionSummary} summary
 * @property {string} codec
 * @property {string} container
 * @property {number} frames
 * @property {number} expected
 * @property {string | null} stopped
 * @property {number | null} frameRate
 */

/**
 * Footage the worker cannot read itself (no WebCodecs, a codec the browser cannot decode): the
 * page takes the frames by drawing them instead. Nothing has been searched.
 * @typedef {{fallback: string}} FootageUnread
 */

/**
 * What the page takes from the core's own tables instead of writing it again: the tracking methods
 * (registered once in the core) and the crossing margins, in box heights, by default and for boxes
 * found in footage.
 * @typedef {object} CoreFacts
 * @property {{name: string, label: string, needs_embeddings: boolean}[]} methods
 * @property {number} default_hysteresis
 * @property {number} footage_hysteresis
 */

/**
 * The requests, one kind per operation. Buffers named `bytes`, `pixels` and `wasm` are handed over
 * (transferred), not copied.
 * @typedef {{op: "init", wasm: Uint8Array}} InitRequest
 * @typedef {{op: "loadDetections", bytes: ArrayBuffer}} LoadDetectionsRequest
 * @typedef {{op: "setPlan", json: string}} SetPlanRequest
 * @typedef {{op: "track", method: string, settings: string}} TrackRequest
 * @typedef {{op: "startDetection", width: number, height: number, settings: string}} StartDetectionRequest
 * @typedef {{op: "detectRgba", pixels: ArrayBuffer, width: number, height: number}} DetectRgbaRequest
 * @typedef {{op: "finishDetection"}} FinishDetectionRequest
 * @typedef {{op: "findInFootage", footage: Blob, width: number, height: number, settings: string, expectedFrames: number}} FindInFootageRequest
 * @typedef {{op: "cancelFind"}} CancelFindRequest
 * @typedef {{op: "detectionsText"}} DetectionsTextRequest
 * @typedef {{op: "tracksText"}} TracksTextRequest
 * @typedef {InitRequest | LoadDetectionsRequest | SetPlanRequest | TrackRequest | StartDetectionRequest | DetectRgbaRequest
 *   | FinishDetectionRequest | FindInFootageRequest | CancelFindRequest | DetectionsTextRequest | TracksTextRequest} Request
 * @typedef {Request & {id: number}} RequestMessage a request as posted to the worker
 */

/**
 * What each operation's result message carries.
 * @typedef {object} ResultOf
 * @property {CoreFacts} init
 * @property {DetectionSummary} loadDetections
 * @property {Results | null} setPlan the report and CSV when there are tracks, else null
 * @property {TrackOutput} track
 * @property {true} startDetection
 * @property {number} detectRgba objects found in the frame
 * @property {DetectionSummary} finishDetection the found boxes are now the detections
 * @property {FootageSearched | FootageUnread} findInFootage
 * @property {true} cancelFind
 * @property {string} detectionsText
 * @property {string} tracksText
 */

/**
 * The worker's answers.
 * @typedef {{kind: "progress", id: number, done: number, total: number}} ProgressMessage
 * @typedef {{kind: "result", id: number, result: ResultOf[keyof ResultOf]}} ResultMessage
 * @typedef {{kind: "error", id: number, message: string}} ErrorMessage the operation failed: `message` says why
 * @typedef {{kind: "cancelled", id: number}} CancelledMessage the operation was stopped on request
 * @typedef {ProgressMessage | ResultMessage | ErrorMessage | CancelledMessage} Reply
 */

/**
 * A call that was stopped on purpose: Cancel while finding objects (the worker answers
 * "cancelled"), or the worker replaced while tracking. Not a failure, so the page says so calmly.
 */
export class Cancelled extends Error {
  constructor() {
    super("cancelled");
    this.name = "Cancelled";
  }
}
