// @ts-check
// The report, shown: totals per line and direction, counts per interval (charts and table), zones,
// movements and speeds, in words a person who did not build the tool can read. Shown whenever the
// core counts anew, hidden when the counts are gone. (The count events behind every number are in
// the Review's list, review-events.js.)

import { el, table, clockText, byId } from "./dom.js";
import { intervalCharts, intervalCount, startFormat, clockPart } from "./chart.js";
import { speedsNote } from "./plan.js";
import { itemNames } from "./palette.js";

/**
 * The core's report (crate/core/src/report/mod.rs, Report), as far as the page reads it.
 * @typedef {object} Report
 * @property {string} caution
 * @property {{method: string} | null} tracker
 * @property {number} frame_count
 * @property {number} duration_seconds
 * @property {number} tracks_counted
 * @property {ScreenlineReport[]} screenlines
 * @property {ZoneReport[]} zones
 * @property {{origin: string, destination: string, class: string, count: number, u_turn: boolean}[]} movements
 * @property {{unit: string, by_class: Record<string, Summary>, all: Summary} | null} speeds
 * @property {CountEvent[]} events
 * @property {{tracks: number[], gap_frames: number}[]} joins fragments the counting joined into one path, in time order
 * @property {import("./edits.js").Outcome[]} [edits] the person's corrections, each with what it did or why it could not
 * @property {CountEvent[]} [rejected_events] counted crossings a person rejected; in no count
 * @property {CountEvent[]} [deleted_events] what the tracks a person deleted counted (those tracks alone); in no count
 * @property {import("./tally-checks.js").TallyCheck[]} [checks] each hand count beside the tool's count of its frames
 * @property {import("./tally-checks.js").AppliedCorrection} [correction] a correction factor the person chose, and what it gives
 */
/** @typedef {{forward: number, backward: number}} DirectionCounts */
/** @typedef {{start: string, end: string, partial: boolean, forward: number, backward: number, by_class: Record<string, DirectionCounts>}} IntervalCount */
/**
 * @typedef {object} ScreenlineReport
 * @property {string} name
 * @property {string} forward_label
 * @property {string} backward_label
 * @property {number} forward
 * @property {number} backward
 * @property {number} inferred
 * @property {number} [added] crossings a person added
 * @property {number} [rejected] crossings a person rejected (not in the totals)
 * @property {Record<string, DirectionCounts>} by_class
 * @property {IntervalCount[]} intervals
 * @property {{start: string, end: string, volume: number, phf: number} | null} peak_hour
 */
/** @typedef {{name: string, entries: number, exits: number, present_at_start: number, present_at_end: number, dwell_seconds: Summary, added?: number, rejected?: number}} ZoneReport */
/** @typedef {{count: number, mean: number | null, median: number | null, p85: number | null}} Summary */
/**
 * One count: a track crossing a line or entering or leaving a zone, at (x, y) in video pixels.
 * @typedef {object} CountEvent
 * @property {number} track
 * @property {number[]} track_ids
 * @property {"screenline" | "zone"} kind
 * @property {string} name
 * @property {string} direction
 * @property {string} label
 * @property {number} frame
 * @property {number} seconds
 * @property {string} time
 * @property {string} class
 * @property {number} x
 * @property {number} y
 * @property {boolean} [inferred]
 * @property {boolean} [added] a crossing a person added (track 0)
 * @property {string} [reason] why a person added or rejected it
 */

/** The Results view's counts: the report when there is one, nothing when the counts are gone. */
export class ResultsPanel {
  /**
   * @param {import("./store.js").PageStore} store
   * @param {(name: string) => string} methodLabel a tracking method's name as people read it
   */
  constructor(store, methodLabel) {
    const root = byId("results", HTMLElement);
    /** @param {string} name */
    const keyColour = (name) => store.keyColours.colour(name, itemNames(store.plan));
    store.subscribe(["results", "footage"], () => {
      byId("results-empty", HTMLElement).hidden = Boolean(store.results);
      if (!store.results) {
        root.hidden = true;
        return;
      }
      root.hidden = false;
      const report = store.results.report;
      byId("caution", HTMLElement).textContent = report.caution;
      const { bridged: summary, bridgedWith: was } = store;
      const bridged = bridgedLine(summary, was && was !== store.footage ? was.name : null);
      byId("summary", HTMLElement).replaceChildren(summaryLine(report, methodLabel), ...(bridged ? [bridged] : []), ...totals(report));
      showIntervals(report, keyColour);
      byId("zones-table", HTMLElement).replaceChildren(...zones(report));
      byId("movements-table", HTMLElement).replaceChildren(...movements(report));
      byId("speeds-table", HTMLElement).replaceChildren(...speeds(report, speedsNote(store.plan)));
    });
    store.subscribe(["results", "planProblem"], () => {
      byId("results-stale", HTMLElement).textContent = store.results && store.planRefused ? staleCounts : "";
    });
  }
}

/** Said over counts made with a plan that has since been changed into one the core refuses. */
export const staleCounts =
  "These counts are of the plan as it was before its last change, which needs a fix (Set up, Plan). " +
  "Mend it and the counts follow; do not hand these in for the plan shown.";

/**
 * @param {Report} report
 * @param {(name: string) => string} methodLabel
 */
function summaryLine(report, methodLabel) {
  const t = report.tracker;
  const how = t ? ` Tracked with ${methodLabel(t.method)}.` : "";
  return el("p", { class: "hint", text: `${report.tracks_counted} paths counted over ${report.frame_count} frames (${clockText(report.duration_seconds)}); where one person's or vehicle's track broke into pieces, the pieces were joined into one path.${how}` });
}

/**
 * What bridging missed detections with the footage did to the tracks counted, in words; null when
 * it did not run.
 * @param {import("./protocol.js").Bridged} bridged
 * @param {string | null} before the footage's name when other footage has been opened since
 */
function bridgedLine(bridged, before) {
  if (!bridged) return null;
  if ("skipped" in bridged) {
    return el("p", { class: "note", text: `Gaps where the detections missed someone were not bridged: ${bridged.skipped}. These counts are from the detections alone.` });
  }
  const { followed, joined, not_followed: left, stopped } = bridged;
  const gaps = (/** @type {number} */ n) => `${n} ${n === 1 ? "gap" : "gaps"}`;
  const ended = stopped ? "reading the footage stopped early" : "the footage ended first, or too many at once";
  let text;
  if (followed === 0 && left > 0) {
    text = `${gaps(left)} where one track ended and another began soon after could not be followed in the footage (${ended}), so none was bridged.`;
  } else if (followed === 0) {
    text = "no track ended where another began soon after, so nothing was followed in the footage.";
  } else {
    const more = left > 0 ? ` ${left} more could not be followed (${ended}).` : "";
    text = `${joined} of ${gaps(followed)} where one track ended and another began soon after ${joined === 1 ? "was" : "were"} bridged by following the person or vehicle in the footage, joining the two tracks into one.${more}`;
  }
  if (stopped) text += ` Reading the footage stopped early: ${stopped}. The file may be damaged or cut short: re-encode it with ffmpeg and press Run again.`;
  if (before) text += ` These tracks were bridged with ${before}, the footage open before; press Run to bridge with the footage open now.`;
  return el("p", { class: before ? "note" : "hint", id: "bridged-summary", text: `Missed detections: ${text}` });
}

/** @param {Report} report */
function totals(report) {
  const rows = report.screenlines.map((l) => [l.name, `${l.forward_label}: ${l.forward}`, `${l.backward_label}: ${l.backward}`, l.forward + l.backward, l.inferred]);
  const headers = ["Line", "Forward", "Backward", "Total", "Counted while hidden"];
  // Corrected counts say so: crossings added by hand are in the totals, rejected ones are not.
  if (report.screenlines.some((l) => l.added || l.rejected)) {
    headers.push("Added by hand", "Rejected");
    report.screenlines.forEach((l, i) => rows[i].push(l.added || 0, l.rejected || 0));
  }
  const out = [table(headers, rows, [3, 4, 5, 6])];
  if (report.screenlines.some((l) => l.inferred > 0)) {
    out.push(el("p", { class: "note", text: "Counted while hidden: crossings made while the person or vehicle was out of the camera's sight; where it crossed was predicted from how it moved before and after. They are among the counts; check them in Review, Events." }));
  }
  for (const l of report.screenlines) {
    if (l.peak_hour) {
      out.push(el("p", { class: "hint", text: `${l.name}: peak hour ${clockPart(l.peak_hour.start)}–${clockPart(l.peak_hour.end)}, ${l.peak_hour.volume} crossings, peak hour factor ${l.peak_hour.phf.toFixed(2)}` }));
    }
  }
  return out;
}

/** @param {ScreenlineReport} line */
function classNames(line) {
  return Object.keys(line.by_class).sort();
}

/**
 * The charts and the interval table, for all classes or the one chosen in the class list (shown
 * when the report has more than one class). The choice is kept while that class is in the report.
 * @param {Report} report
 * @param {(name: string) => string} keyColour
 */
function showIntervals(report, keyColour) {
  const field = byId("chart-class-field", HTMLElement);
  const select = byId("chart-class", HTMLSelectElement);
  const classes = [...new Set(report.screenlines.flatMap(classNames))].sort();
  const kept = classes.includes(select.value) ? select.value : "";
  select.replaceChildren(el("option", { value: "", text: "all" }), ...classes.map((c) => el("option", { value: c, text: c })));
  select.value = kept;
  field.hidden = classes.length < 2;
  const draw = () => {
    const cls = select.value || null;
    byId("chart", HTMLElement).replaceChildren(...intervalCharts(report, cls, keyColour));
    byId("interval-table", HTMLElement).replaceChildren(intervalTable(report, cls));
  };
  select.onchange = draw;
  draw();
}

/**
 * @param {Report} report
 * @param {string | null} only one class, or null for all
 */
function intervalTable(report, only) {
  /** @type {(string | number)[][]} */
  const rows = [];
  for (const line of report.screenlines) {
    const clock = startFormat(line.intervals);
    for (const iv of line.intervals) {
      for (const [dir, label] of /** @type {const} */ ([["forward", line.forward_label], ["backward", line.backward_label]])) {
        const when = `${clock(iv.start)}–${clock(iv.end)}${iv.partial ? " (part)" : ""}`;
        const classes = only ? [only] : classNames(line);
        for (const cls of classes) rows.push([line.name, label, cls, when, intervalCount(iv, dir, cls)]);
        if (!only && classes.length !== 1) rows.push([line.name, label, "all", when, iv[dir]]);
      }
    }
  }
  const partial = report.screenlines.some((l) => l.intervals.some((iv) => iv.partial));
  const note = el("p", { class: "note", text: "(part): the footage ends before this interval does, so its count covers only part of it." });
  return el("div", {}, [table(["Line", "Direction", "Class", "Interval", "Count"], rows, [4]), partial ? note : null]);
}

/**
 * Median / mean / 85th percentile, or a dash when there is nothing to summarise.
 * @param {Summary} s
 */
function stat(s) {
  /** @param {number | null} v */
  const fixed = (v) => (v === null ? "–" : v.toFixed(1));
  return s && s.count ? `${fixed(s.median)} / ${fixed(s.mean)} / ${fixed(s.p85)}` : "–";
}

/**
 * Each zone's entries and exits, and the people or vehicles first or last seen inside it, which
 * add up: first seen inside + entries = exits + last seen inside.
 * @param {Report} report
 */
function zones(report) {
  if (!report.zones.length) return [];
  // Time inside is of the visits seen both entering and leaving, often few of the entries (a
  // newcomer's trial: three of twelve, not said): how many is said beside it.
  const visits = (/** @type {Summary} */ s) => (s && s.count ? `${stat(s)} (${s.count} ${s.count === 1 ? "visit" : "visits"})` : "–");
  const rows = report.zones.map((z) => [z.name, z.present_at_start, z.entries, z.exits, z.present_at_end, visits(z.dwell_seconds)]);
  const headers = ["Zone", "First seen inside", "Entries", "Exits", "Last seen inside", "Time inside, s (median / mean / 85th percentile, of the visits seen both entering and leaving)"];
  // Corrected counts say so: entries and exits added by hand are in the totals, rejected ones are not.
  const corrected = report.zones.some((z) => z.added || z.rejected);
  if (corrected) {
    headers.push("Added by hand", "Rejected");
    report.zones.forEach((z, i) => rows[i].push(z.added || 0, z.rejected || 0));
  }
  const sums = report.zones.map((z) => {
    const adds = z.present_at_start + z.entries === z.exits + z.present_at_end;
    const sum = `${z.present_at_start} first seen inside + ${z.entries} entries = ${z.exits} exits + ${z.present_at_end} last seen inside`;
    if (adds) return `${z.name}: ${sum}.`;
    if (z.added || z.rejected) return `${z.name}: ${z.present_at_start} + ${z.entries} is not ${z.exits} + ${z.present_at_end}, after your corrections (first and last seen inside follow the tracks).`;
    return `${z.name}: ${z.present_at_start} + ${z.entries} is not ${z.exits} + ${z.present_at_end}: the report's count events list every entry and exit to check.`;
  });
  return [
    el("h3", { text: "Zones" }),
    table(headers, rows, corrected ? [1, 2, 3, 4, 6, 7] : [1, 2, 3, 4]),
    el("p", { class: "note", text: `${sums.join(" ")} Someone first seen inside (there when the footage starts, or appearing inside) has no entry; someone last seen inside (there when it ends, or vanishing inside) has no exit.` }),
  ];
}

/** @param {Report} report */
function movements(report) {
  // One line (or zone) alone: a "movement" from it to itself is only a path that met it twice
  // (a newcomer's trial: "walkway → walkway, U-turn" read as noise beside a screenline count).
  if (report.screenlines.length + report.zones.length === 1) {
    return [el("h3", { text: "Movements" }), el("p", { class: "hint", text: "Movements (from one line or zone to another, as in a turning count) need two or more in the plan; this plan has one." })];
  }
  if (!report.movements.length) return [];
  const rows = report.movements.map((m) => [m.origin, m.destination, m.class || "unclassified", m.count, m.u_turn ? "yes" : ""]);
  return [el("h3", { text: "Movements (first line or zone met → last)" }), table(["From", "To", "Class", "Count", "U-turn"], rows, [3])];
}

/**
 * @param {Report} report
 * @param {string} missing why the plan gives no speeds, or ""
 */
function speeds(report, missing) {
  const s = report.speeds;
  if (!s) {
    const why = missing || "No speeds: they need 4 or more ground points whose ground position you know (Set up, Add ground point).";
    return [el("h3", { text: "Speeds" }), el("p", { class: "hint", id: "speeds-missing", text: why })];
  }
  const rows = Object.entries(s.by_class).map(([cls, v]) => [cls, v.count, stat(v)]);
  rows.push(["all", s.all.count, stat(s.all)]);
  return [el("h3", { text: `Speeds (${s.unit} per second)` }), table(["Class", "Tracks", "median / mean / 85th percentile"], rows, [1])];
}
