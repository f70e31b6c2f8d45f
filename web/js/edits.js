// @ts-check
// The person's corrections as the page holds them: the same objects as the edits file
// (docs/edits-format.md), made here from what the person chose, and told back in plain words. The
// core applies them (in its worker) and says for each whether it applied; nothing here counts.

/** A track as the person saw it: its id and its first and last frame (1-based). @typedef {{id: number, frames: [number, number]}} TrackRef */
/** Which way a crossing went, as the plan draws the line. @typedef {"forward" | "backward"} Way */
/** Which way a zone was passed: in or out. @typedef {"entry" | "exit"} ZoneWay */
/**
 * One correction (crate/core/src/edits/mod.rs, Edit). `reason` is left out when none was given.
 * @typedef {{edit: "merge_tracks", track: TrackRef, into: TrackRef, reason?: string}} MergeEdit
 * @typedef {{edit: "split_track", track: TrackRef, at_frame: number, reason?: string}} SplitEdit
 * @typedef {{edit: "delete_track", track: TrackRef, reason?: string}} DeleteEdit
 * @typedef {{edit: "set_class", track: TrackRef, class: string, reason?: string}} ClassEdit
 * @typedef {{edit: "reject_crossing", screenline: string, direction: Way, track: number, frame: number, reason?: string}} RejectEdit
 * @typedef {{edit: "add_crossing", screenline: string, direction: Way, class: string, frame: number, x?: number, y?: number, reason?: string}} AddEdit
 * @typedef {{edit: "reject_zone_event", zone: string, way: ZoneWay, track: number, frame: number, reason?: string}} RejectZoneEdit
 * @typedef {{edit: "add_zone_event", zone: string, way: ZoneWay, class: string, frame: number, reason?: string}} AddZoneEdit
 * @typedef {MergeEdit | SplitEdit | DeleteEdit | ClassEdit | RejectEdit | AddEdit | RejectZoneEdit | AddZoneEdit} Edit
 */
/** What became of an edit when the core applied it: `note` says what it did or why it could not. @typedef {{edit: Edit, applied: boolean, note: string}} Outcome */
/** What the words need: a line's name for a direction, and frames to clock time. @typedef {{label: (line: string, way: Way) => string, clock: (frame: number) => string}} Wording */

export const EDITS_FORMAT = "throughline-edits";

/**
 * The edits file's text (docs/edits.schema.json) for these edits.
 * @param {Edit[]} edits
 */
export function editsFileText(edits) {
  return JSON.stringify({ format: EDITS_FORMAT, version: 1, edits });
}

/**
 * How an edit names a track.
 * @param {{id: number, first_frame: number, last_frame: number}} t
 * @returns {TrackRef}
 */
export function trackRef(t) {
  return { id: t.id, frames: [t.first_frame, t.last_frame] };
}

/**
 * `edit` with `reason` added when the person gave one (blank: none).
 * @template {Edit} E
 * @param {E} edit
 * @param {string} reason
 * @returns {E}
 */
export function withReason(edit, reason) {
  const r = reason.trim();
  return r ? { ...edit, reason: r } : edit;
}

/**
 * Whether two edits are the same correction (the same fields, in any order).
 * @param {unknown} a
 * @param {unknown} b
 */
export function sameEdit(a, b) {
  return canonical(a) === canonical(b);
}

/**
 * A crossing a doubt names (its own, or for two close together the other, `close_to`) as the
 * edit that rejects it.
 * @param {import("./protocol.js").Doubt["crossing"]} c
 * @returns {RejectEdit | null}
 */
export function rejectionOf(c) {
  return c ? { edit: "reject_crossing", screenline: c.screenline, direction: c.direction, track: c.track, frame: c.frame } : null;
}

/**
 * The doubtful moments marked rejected by a rejection of one of their crossings, `e` (its reason
 * aside): taking `e` back takes back those decisions too. The crossing's own moment is named by
 * its key (crate/core/src/review: `crossing:LINE:TRACK:FRAME`; rejected, it is in no queue now);
 * a moment of two crossings close together, by the other one (`close_to`).
 * @param {Edit} e
 * @param {import("./protocol.js").Doubt[]} doubts the queue now
 * @param {Map<string, string>} marks decisions by moment
 * @returns {string[]} the moments' keys
 */
export function marksOfRejection(e, doubts, marks) {
  if (e.edit !== "reject_crossing") return [];
  const bare = { ...e, reason: undefined };
  const names = (/** @type {import("./protocol.js").Doubt} */ d) => sameEdit(rejectionOf(d.close_to), bare);
  const keys = [`crossing:${e.screenline}:${e.track}:${e.frame}`, ...doubts.filter(names).map((d) => d.key)];
  return [...new Set(keys)].filter((k) => marks.get(k) === "rejected");
}

/**
 * JSON with object keys sorted, so two objects with the same fields compare equal.
 * @param {unknown} v
 * @returns {string}
 */
function canonical(v) {
  if (Array.isArray(v)) return `[${v.map(canonical).join(",")}]`;
  if (v && typeof v === "object") {
    const o = /** @type {Record<string, unknown>} */ (v);
    return `{${Object.keys(o).sort().filter((k) => o[k] !== undefined).map((k) => `${JSON.stringify(k)}:${canonical(o[k])}`).join(",")}}`;
  }
  return JSON.stringify(v);
}

/**
 * The edit in plain words, without its reason: "Track 21 joined to track 17, as one object".
 * @param {Edit} e
 * @param {Wording} w
 */
export function editWords(e, w) {
  switch (e.edit) {
    case "merge_tracks": return `Track ${e.track.id} joined to track ${e.into.id}, as one object`;
    case "split_track": return `Track ${e.track.id} split in two at frame ${e.at_frame} (${w.clock(e.at_frame)})`;
    case "delete_track": return `Track ${e.track.id} left out: not an object to count`;
    case "set_class": return `Track ${e.track.id} counted as ${e.class}`;
    case "reject_crossing": return `Crossing of ${e.screenline}, ${w.label(e.screenline, e.direction)}, by track ${e.track} at frame ${e.frame} (${w.clock(e.frame)}) not counted`;
    case "add_crossing": return `Crossing of ${e.screenline}, ${w.label(e.screenline, e.direction)}, by a ${e.class} added at frame ${e.frame} (${w.clock(e.frame)})`;
    case "reject_zone_event": return `${e.way === "entry" ? "Entry to" : "Exit from"} ${e.zone} by track ${e.track} at frame ${e.frame} (${w.clock(e.frame)}) not counted`;
    case "add_zone_event": return `${e.way === "entry" ? "Entry to" : "Exit from"} ${e.zone} by a ${e.class} added at frame ${e.frame} (${w.clock(e.frame)})`;
    default: return "A correction this page does not know";
  }
}

/**
 * What became of edit `i` of `edits`, as the report of the latest count says; null while the
 * report is not of these edits yet (before Run, or while counting).
 * @param {Edit[]} edits
 * @param {Outcome[] | undefined} outcomes
 * @param {number} i
 */
export function outcomeOf(edits, outcomes, i) {
  const o = outcomes ? outcomes[i] : undefined;
  return o && outcomes && outcomes.length === edits.length && sameEdit(o.edit, edits[i]) ? o : null;
}

/**
 * The tracks an edit is about (tracker ids), to show it on the picture.
 * @param {Edit} e
 * @returns {number[]}
 */
export function editTracks(e) {
  if (e.edit === "merge_tracks") return [e.into.id, e.track.id];
  if (e.edit === "reject_crossing" || e.edit === "reject_zone_event") return [e.track];
  if (e.edit === "add_crossing" || e.edit === "add_zone_event") return [];
  return [e.track.id];
}

/**
 * The frame an edit is about, to show it in the footage.
 * @param {Edit} e
 */
export function editFrame(e) {
  if (e.edit === "merge_tracks") return e.track.frames[0];
  if (e.edit === "split_track") return e.at_frame;
  if (e.edit === "reject_crossing" || e.edit === "add_crossing" || e.edit === "reject_zone_event" || e.edit === "add_zone_event") return e.frame;
  return e.track.frames[0];
}
