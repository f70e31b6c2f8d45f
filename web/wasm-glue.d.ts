// The core as worker.js sees it: wasm-bindgen's glue (no-modules target, loaded before the worker's
// own code) defines one global, `wasm_bindgen`. Only what the worker uses is declared here; the
// source of truth is crate/wasm/src/lib.rs (Session) and crate/wasm/src/footage.rs (FootageReader).
// For the type check only (web/jsconfig.worker.json); the page never loads this file.

type DetectionSummary = import("./js/protocol.js").DetectionSummary;
type TrackInfo = import("./js/protocol.js").TrackInfo;
type CoreFacts = import("./js/protocol.js").CoreFacts;
type Doubt = import("./js/protocol.js").Doubt;
type Outcome = import("./js/edits.js").Outcome;
type Project = import("./js/protocol.js").Project;
type ProjectAge = import("./js/protocol.js").ProjectAge;
type Fingerprint = import("./js/protocol.js").Fingerprint;
type HandinContext = import("./js/protocol.js").HandinContext;
type MergedGrid = import("./js/protocol.js").MergedGrid;
type BridgeSummary = import("./js/protocol.js").BridgeSummary;

declare function wasm_bindgen(init: { module_or_path: Uint8Array | BufferSource }): Promise<unknown>;

declare namespace wasm_bindgen {
  /** The tracking methods and default margins, from the core's own tables. */
  function coreFacts(): CoreFacts;
  /** Reads a project file's text (and how its version differs); errors name the line and column. */
  function readProject(text: string): { project: Project, age: ProjectAge };
  /** Checks a plan file's text as the command line reads it; errors name the line and column. */
  function checkPlan(text: string): void;
  /** A project (plain object) as the project file's text; format, version and generator filled in. */
  function writeProject(project: object): string;
  /** A file's fingerprint from its name, size, first bytes (at least the first MiB) and duration (0: none). */
  function fingerprint(name: string, size: number, head: Uint8Array, duration: number): Fingerprint;
  /** Why `opened` is not the file `recorded` was taken of, or null (undefined) when it is. */
  function fingerprintDiffers(recorded: object, opened: object): string | null | undefined;
  /** A merged counts file (throughline batch) as the interval grid of one camera and class. */
  function mergedGrid(bytes: Uint8Array, camera: string, cls: string): MergedGrid;

  /** One page's state in the core: detections, plan, tracks. Errors are thrown as JS errors. */
  class Session {
    constructor();
    loadDetections(bytes: Uint8Array): DetectionSummary;
    setPlan(json: string): void;
    /** The duration of the footage the work is on, its fingerprint's (0: none); give the plan after. */
    setFootageSeconds(seconds: number): void;
    planOutsidePicture(width: number, height: number): string[];
    track(method: string, settings: string, progress: (done: number, total: number) => void): number;
    report(): string;
    countsCsv(): string;
    tracksText(): string;
    allBoxes(): Float32Array;
    /** The tracks' paths as counted under the plan: id, frame, x, y, observed (1/0) a point. */
    countedPaths(ids: Uint32Array): Float32Array;
    /** How many tracks the tracker made, before the person's corrections. */
    trackedCount(): number;
    trackList(): TrackInfo[];
    /** Sets the corrections (an edits file's or a project file's text) and counts again. */
    setEdits(json: string): Outcome[];
    /** Sets a project file's corrections, hand counts and correction factor, and counts again. */
    setWork(projectJson: string): Outcome[];
    /** The corrections as an edits file. */
    editsText(): string;
    /** The doubtful moments of the last count, most doubtful first; the picture's size (0: unknown). */
    doubts(width: number, height: number): Doubt[];
    startDetection(width: number, height: number, settings: string): void;
    detectRgba(rgba: Uint8Array, width: number, height: number): number;
    detectYuv(bytes: Uint8Array, width: number, height: number, layout: string): number;
    /** Whether the clip is read once for its background before its frames are searched. */
    wholeClipBackground(): boolean;
    /** Whether the next frame of that first reading is one the background keeps. */
    wantsSample(): boolean;
    sampleYuv(bytes: Uint8Array, width: number, height: number, layout: string): void;
    sampleRgba(rgba: Uint8Array, width: number, height: number): void;
    passSample(): void;
    /** The frames (from 1) the background keeps of a clip this long; empty without the first reading. */
    backgroundFrames(total: number): Uint32Array;
    finishDetection(): DetectionSummary;
    detectionsText(): string;
    /** After track() with no footage to bridge with: the tracks' settings say nothing was bridged (bridge_frames 0); the gap length asked for. */
    notBridged(): number;
    /** After track(), when its settings bridge (bridge_frames above 0): a handle fed the footage's frames; else undefined. */
    startBridging(width: number, height: number): FootageBridge | undefined;
    /** The interval grid: a row per interval ("wide") or per interval, line, direction and class ("long"); CSV ("comma") or for the clipboard ("tab"). */
    intervalGrid(layout: "wide" | "long", separator: "comma" | "tab", ctx: HandinContext): string;
    /** The origin–destination matrix of movements. */
    movementMatrix(separator: "comma" | "tab", ctx: HandinContext): string;
    /** The client summary, a self-contained printable HTML page. */
    summaryHtml(ctx: HandinContext): string;
    /** The stem of the hand-in files' names: site and date. */
    fileStem(ctx: HandinContext): string;
    free(): void;
  }

  /** Joins the session's tracks across missed detections, fed the footage's luma planes frame by frame (crate/wasm/src/bridging.rs). */
  class FootageBridge {
    /** The last frame (1-based) the gaps need; 0 when none needs footage. */
    lastFrameNeeded(): number;
    /** Frame `frame` (1-based, in order) as its luma plane (width x height bytes). */
    feed(frame: number, luma: Uint8Array): void;
    /** Frame `frame` as RGBA pixels. */
    feedRgba(frame: number, rgba: Uint8Array): void;
    /** Makes the bridged tracks the session's and counts them; consumes the handle. */
    finish(session: Session): BridgeSummary;
    free(): void;
  }

  /** WebM or MP4 read a byte range at a time through `read(offset, length)`. */
  class FootageReader {
    constructor(read: (offset: number, length: number) => Uint8Array, size: number);
    info(): { container: string; codec: string; description?: Uint8Array; codedWidth: number; codedHeight: number; frames?: number };
    next(): { data: Uint8Array; timestamp: number; key: boolean } | null;
    cutShort(): string | undefined;
    free(): void;
  }
}
