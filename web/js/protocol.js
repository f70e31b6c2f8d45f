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

/**
 * A track without its boxes (crate/wasm/src/boxes.rs, trackList), after the person's edits: frames
 * 1-based, boxes `[x, y, w, h]` in pixels (top-left + size), `seen` the frames it was seen in,
 * `class_votes` how many of its detections carried each class, most first.
 * @typedef {{id: number, class: string | null, first_frame: number, last_frame: number, seen?: number,
 *   first_box?: number[], last_box?: number[], class_votes?: [string, number][]}} TrackInfo
 */

/**
 * A moment of the count most likely wrong (crate/core/src/review.rs, Doubt): where to look (frame
 * 1-based, seconds, clock), the tracks concerned, the crossing when it is one, and why, one sentence
 * per reason (`kinds`, most weighty first). `key` stays the same while tracks and plan do.
 * @typedef {object} Doubt
 * @property {string} key
 * @property {DoubtKind[]} kinds
 * @property {number} frame
 * @property {number} seconds
 * @property {string} time
 * @property {number[]} tracks
 * @property {{screenline: string, direction: "forward" | "backward", track: number, frame: number}} [crossing]
 * @property {{screenline: string, direction: "forward" | "backward", track: number, frame: number}} [close_to] for two crossings close together, the other one
 * @property {string[]} why
 * @property {number} weight
 */
/**
 * What a file was, to tell whether work is opened against the same one (crate/core/src/fingerprint.rs):
 * its name, size in bytes, the SHA-256 of its first MiB, and for footage its duration in seconds
 * and the picture's size in pixels.
 * @typedef {{name: string, size: number, head_sha256: string, duration_seconds?: number, width?: number, height?: number}} Fingerprint
 */

/**
 * A project file as the core reads it (docs/project.schema.json): the plan, the tracking method,
 * the corrections, the review decisions, the site, hand counts and a correction factor, and the
 * fingerprints of the footage and detections it was made with.
 * @typedef {object} Project
 * @property {string} [format]
 * @property {number} [version]
 * @property {string} [generator]
 * @property {object} plan
 * @property {{method?: string, settings?: Record<string, unknown>}} tracking
 * @property {import("./edits.js").Edit[]} edits
 * @property {{key: string, decision: string}[]} review
 * @property {string} [site]
 * @property {import("./tally.js").Tally[]} [tallies]
 * @property {import("./tally.js").Correction} [correction]
 * @property {Fingerprint} [footage]
 * @property {Fingerprint} [detections]
 * @property {{far_height?: number, near_height?: number}} [detector] the detector's settings the page finds objects with
 */

/**
 * What the hand-in outputs say about where the counts come from (crate/core/src/handin, Context):
 * the site, the plan's and project's file names, the footage and detections (fingerprints) and,
 * for the client summary, a still of the footage as a `data:image/...` URL.
 * @typedef {{site?: string, plan_name?: string, footage?: Fingerprint, detections?: Fingerprint, still?: string, project_name?: string, found_in_footage?: boolean, found_in_page?: boolean, notes?: InputNote[]}} HandinContext
 */
/**
 * A warning about the inputs for the hand-in files: a sentence already written, or the facts of one
 * the core words as the command line does (crate/core/src/handin/said.rs).
 * @typedef {{said: string} | {frame_rate: {footage: string, rate: number, planned: number}} | {past_footage: {last_frame: number, footage_frames: number}}} InputNote
 */
/** A table as CSV (the file) and as tab-separated text (for the clipboard). @typedef {{csv: string, tab: string}} SheetText */
/**
 * The hand-in tables written by the core: the stem of their file names (site and date), the
 * interval grid with a row per interval (`wide`) or per interval, line, direction and class
 * (`long`), and the movement matrix.
 * @typedef {{stem: string, wide: SheetText, long: SheetText, matrix: SheetText}} HandIn
 */

/** @typedef {"short_track" | "at_track_end" | "joined_track" | "close_together" | "hidden" | "barely_seen" | "starts_near_line" | "ends_near_line" | "on_line_at_footage_edge" | "class_changes" | "starts_inside_zone" | "ends_inside_zone"} DoubtKind */

/**
 * Tracks for drawing: `boxes` holds 7 values per box (frame 1-based, id, x, y, w, h in pixels
 * top-left + size, observed 1/0), ordered by frame (crate/wasm/src/lib.rs, allBoxes).
 * @typedef {{tracks: number, boxes: Float32Array, trackList: TrackInfo[]}} TrackOutput
 */

/**
 * Footage to bridge missed detections with after tracking (when the settings' `bridge_frames` is
 * above 0): the file and the picture's size in pixels.
 * @typedef {{file: Blob, width: number, height: number}} TrackFootage
 */

/**
 * What bridging did (crate/wasm/src/bridging.rs): gaps between a track's end and a later track's
 * start followed in the footage, those whose forward and backward followings met, those not
 * followed (the footage ended first, or too many at once), and the gaps bridged (tracks joined);
 * `stopped`: why reading the footage stopped early (damaged footage), when it did.
 * @typedef {{followed: number, met: number, not_followed: number, joined: number, stopped?: string}} BridgeSummary
 */
/**
 * Bridging after a run: what it did, or why the footage could not be read for it (`skipped`:
 * the tracks are as tracked); null when the settings do not bridge or no footage was given.
 * @typedef {BridgeSummary | {skipped: string} | null} Bridged
 */
/** @typedef {TrackOutput & {bridged: Bridged}} Tracked the tracks of a run, after any bridging */

/**
 * The report (JSON text) and counts CSV, exactly as the command line writes them, and the doubtful
 * moments of that count (`throughline review`'s queue).
 * @typedef {{report: string, csv: string, doubts: Doubt[]}} Results
 */

/**
 * After new corrections: the counts (null before tracking or without a plan) and the tracks as
 * edited (null before tracking).
 * @typedef {{results: Results | null, tracks: TrackOutput | null}} Corrected
 */

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
 * @property {number} filled frames missing from the footage, filled so that frame numbers follow its clock
 */

/**
 * Footage the worker cannot read itself (no WebCodecs, a codec the browser cannot decode): the
 * page takes the frames by drawing them instead. Nothing has been searched.
 * @typedef {{fallback: string}} FootageUnread
 */

/**
 * What the page takes from the core's own tables instead of writing it again: the tracking methods
 * (registered once in the core), the crossing margins, in box heights, by default and for boxes
 * found in footage and at most, the seconds paths are averaged over by default and at most, and the
 * longest gap (frames) bridging may be asked to bridge.
 * @typedef {object} CoreFacts
 * @property {{name: string, label: string, needs_embeddings: boolean}[]} methods
 * @property {number} default_hysteresis
 * @property {number} footage_hysteresis
 * @property {number} max_hysteresis
 * @property {number} default_smooth_seconds
 * @property {number} max_smooth_seconds
 * @property {number} max_bridge_frames
 */

/**
 * The requests, one kind per operation. Buffers named `bytes`, `pixels` and `wasm` are handed over
 * (transferred), not copied.
 * @typedef {{op: "init", wasm: Uint8Array}} InitRequest
 * @typedef {{op: "loadDetections", bytes: ArrayBuffer}} LoadDetectionsRequest
 * @typedef {{op: "setPlan", json: string, width: number, height: number, footageSeconds: number}} SetPlanRequest
 * @typedef {{op: "setEdits", json: string, kind: "edits" | "project", width: number, height: number}} SetEditsRequest
 * @typedef {{op: "editsText"}} EditsTextRequest
 * @typedef {{op: "readProject", text: string}} ReadProjectRequest
 * @typedef {{op: "checkPlan", text: string}} CheckPlanRequest
 * @typedef {{op: "planOutsidePicture", width: number, height: number}} PlanOutsidePictureRequest
 * @typedef {{op: "writeProject", project: object}} WriteProjectRequest
 * @typedef {{op: "fingerprint", name: string, size: number, head: ArrayBuffer, duration: number}} FingerprintRequest
 * @typedef {{op: "fingerprintDiffers", recorded: object, opened: object}} FingerprintDiffersRequest
 * @typedef {{op: "track", method: string, settings: string, footage: TrackFootage | null}} TrackRequest
 * @typedef {{op: "startDetection", width: number, height: number, settings: string}} StartDetectionRequest
 * @typedef {{op: "detectRgba", pixels: ArrayBuffer, width: number, height: number}} DetectRgbaRequest
 * @typedef {{op: "backgroundFrames", total: number}} BackgroundFramesRequest
 * @typedef {{op: "sampleRgba", pixels: ArrayBuffer, width: number, height: number}} SampleRgbaRequest
 * @typedef {{op: "finishDetection"}} FinishDetectionRequest
 * @typedef {{op: "findInFootage", footage: Blob, width: number, height: number, settings: string, expectedFrames: number}} FindInFootageRequest
 * @typedef {{op: "cancelFind"}} CancelFindRequest
 * @typedef {{op: "detectionsText"}} DetectionsTextRequest
 * @typedef {{op: "tracksText"}} TracksTextRequest
 * @typedef {{op: "handIn", context: HandinContext}} HandInRequest
 * @typedef {{op: "summaryHtml", context: HandinContext}} SummaryHtmlRequest
 * @typedef {{op: "mergedGrid", bytes: ArrayBuffer, camera: string, class: string}} MergedGridRequest
 * @typedef {{op: "countedPaths", ids: number[]}} CountedPathsRequest
 * @typedef {{op: "footageFacts", footage: Blob}} FootageFactsRequest
 * @typedef {InitRequest | LoadDetectionsRequest | SetPlanRequest | TrackRequest | StartDetectionRequest | DetectRgbaRequest
 *   | FinishDetectionRequest | FindInFootageRequest | CancelFindRequest | DetectionsTextRequest | TracksTextRequest
 *   | SetEditsRequest | EditsTextRequest | ReadProjectRequest | CheckPlanRequest | PlanOutsidePictureRequest
 *   | WriteProjectRequest | FingerprintRequest
 *   | FingerprintDiffersRequest | HandInRequest | SummaryHtmlRequest | MergedGridRequest | BackgroundFramesRequest
 *   | SampleRgbaRequest | CountedPathsRequest | FootageFactsRequest} Request
 * @typedef {Request & {id: number}} RequestMessage a request as posted to the worker
 */

/**
 * What each operation's result message carries.
 * @typedef {object} ResultOf
 * @property {CoreFacts} init
 * @property {DetectionSummary} loadDetections
 * @property {Results | null} setPlan the report and CSV when there are tracks, else null
 * @property {Corrected} setEdits
 * @property {string} editsText the edits file
 * @property {{project: Project, age: ProjectAge}} readProject the project, and how its version differs from this one's
 * @property {true} checkPlan the plan file reads as the command line reads it
 * @property {string[]} planOutsidePicture the plan's lines and zones wholly outside the picture, named
 * @property {string} writeProject the project file
 * @property {Fingerprint} fingerprint
 * @property {string | null} fingerprintDiffers why the file opened is not the one recorded, or null
 * @property {Tracked} track
 * @property {true} startDetection
 * @property {number} detectRgba objects found in the frame
 * @property {number[]} backgroundFrames frames (from 1) the background keeps of a clip this long; none when it forms over the opening frames
 * @property {null} sampleRgba
 * @property {DetectionSummary} finishDetection the found boxes are now the detections
 * @property {FootageSearched | FootageUnread} findInFootage
 * @property {true} cancelFind
 * @property {string} detectionsText
 * @property {string} tracksText
 * @property {HandIn} handIn
 * @property {string} summaryHtml the client summary, a printable HTML page
 * @property {MergedGrid} mergedGrid
 * @property {{rate: number | null, cut: string | null}} footageFacts frames a second the footage is coded at, from its first
 *   frames' times, and why it is cut short where its container says so; each null where unknown
 * @property {Float32Array} countedPaths the tracks' paths as counted, 5 values a point: id, frame
 *   (1-based), x, y (pixels), observed (1/0); track after track, each in frame order
 */

/**
 * A merged counts file of many clips as an interval grid (crate/core/src/report/merged_grid.rs):
 * one camera (`cameras` lists them) and one class (`classes`; "" for all summed), a row per interval
 * on the clock, a count per line and direction (`columns`).
 * @typedef {object} MergedGrid
 * @property {string} site
 * @property {string[]} cameras
 * @property {string[]} classes
 * @property {string} camera
 * @property {string} class
 * @property {{screenline: string, direction: string}[]} columns
 * @property {{start: string, end: string, partial: boolean, counts: number[], total: number}[]} rows
 */

/**
 * How a project saved by an older version differs (crate/wasm/src/corrections.rs): saved before
 * paths were averaged for counting, the crossing margin it counted with (else null); tracked before
 * DeepSORT kept low-score boxes, the tracker settings that make its tracks again (else null).
 * @typedef {{counted_before_averaged_paths: number | null, tracked_before_low_score_boxes: string | null}} ProjectAge
 */

/**
 * The worker's answers.
 * @typedef {{kind: "progress", id: number, done: number, total: number, stage?: string}} ProgressMessage
 *   `stage` "background": finding objects is reading the clip for its background first;
 *   "bridging": tracking is reading the footage to bridge missed detections
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
