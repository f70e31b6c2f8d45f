// @ts-check
// The report, shown: totals per line and direction, counts per interval (chart and table), zones,
// movements, speeds, and the list of count events that every number comes from. Shown whenever the
// core counts anew, hidden when the counts are gone.

import { el, table, clockText, byId } from "./dom.js";
import { planColour } from "./geometry.js";

/**
 * The core's report (crate/core/src/count.rs, Report), as far as the page reads it.
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
 * @property {Record<string, DirectionCounts>} by_class
 * @property {IntervalCount[]} intervals
 * @property {{start: string, end: string, volume: number, phf: number} | null} peak_hour
 */
/** @typedef {{name: string, entries: number, exits: number, present_at_end: number, dwell_seconds: Summary}} ZoneReport */
/** @typedef {{count: number, mean: number | null, median: number | null, p85: number | null}} Summary */
/**
 * One count: a track crossing a line or entering or leaving a zone.
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
 * @property {boolean} [inferred]
 */

const MAX_EVENTS_SHOWN = 2000;

/** The Counts section: the report when there is one, nothing when the counts are gone. */
export class ResultsPanel {
  /**
   * @param {import("./store.js").PageStore} store
   * @param {(event: CountEvent) => void} onEvent an event was clicked: show its moment
   */
  constructor(store, onEvent) {
    const root = byId("results", HTMLElement);
    store.subscribe(["results"], () => {
      if (store.results) showResults(root, store.results.report, onEvent);
      else root.hidden = true;
    });
  }
}

/**
 * @param {HTMLElement} root the Counts section
 * @param {Report} report
 * @param {(event: CountEvent) => void} onEvent
 */
function showResults(root, report, onEvent) {
  root.hidden = false;
  byId("caution", HTMLElement).textContent = report.caution;
  const t = report.tracker;
  const trackerText = t ? ` Tracked with ${t.method}.` : "";
  byId("summary", HTMLElement).replaceChildren(
    el("p", { class: "hint", text: `${report.tracks_counted} tracks counted (fragments of one path joined) over ${report.frame_count} frames (${clockText(report.duration_seconds)}).${trackerText}` }),
    totals(report),
  );
  showIntervals(report);
  byId("zones-table", HTMLElement).replaceChildren(...zones(report));
  byId("movements-table", HTMLElement).replaceChildren(...movements(report));
  byId("speeds-table", HTMLElement).replaceChildren(...speeds(report));
  const events = byId("events", HTMLElement);
  const shown = report.events.slice(0, MAX_EVENTS_SHOWN);
  events.replaceChildren(
    ...shown.map((e) => el("li", {}, el("button", {
      type: "button",
      class: e.inferred ? "inferred" : null,
      text: eventText(e),
      title: e.inferred ? "Inferred: the track was predicted, not seen, as it crossed" : "Seen crossing",
      onclick: () => onEvent(e),
    }))),
  );
  if (report.events.length > shown.length) {
    events.append(el("li", { text: `… and ${report.events.length - shown.length} more in the exported report.` }));
  }
}

/** @param {CountEvent} e */
function eventText(e) {
  const time = e.time ? e.time.slice(11) : clockText(e.seconds);
  const what = e.kind === "screenline" ? `${e.name}: ${e.label}` : `${e.name}: ${e.direction}`;
  const ids = e.track_ids && e.track_ids.length > 1 ? `tracks ${e.track_ids.join("+")}` : `track ${e.track}`;
  return `${time} · frame ${e.frame} · ${what} · ${e.class || "unclassified"} · ${ids}${e.inferred ? " · inferred" : ""}`;
}

/** @param {Report} report */
function totals(report) {
  const rows = report.screenlines.map((l) => [l.name, `${l.forward_label}: ${l.forward}`, `${l.backward_label}: ${l.backward}`, l.forward + l.backward, l.inferred]);
  const out = el("div", {}, [table(["Line", "Forward", "Backward", "Both", "Inferred"], rows, [3, 4])]);
  for (const l of report.screenlines) {
    if (l.peak_hour) {
      out.append(el("p", { class: "hint", text: `${l.name}: peak hour ${l.peak_hour.start.slice(11)}–${l.peak_hour.end.slice(11)}, ${l.peak_hour.volume} crossings, peak hour factor ${l.peak_hour.phf.toFixed(2)}` }));
    }
  }
  return out;
}

/** @param {ScreenlineReport} line */
function classNames(line) {
  return Object.keys(line.by_class).sort();
}

/**
 * The chart and the interval table, for all classes or the one chosen in the class list (shown
 * when the report has more than one class). The choice is kept while that class is in the report.
 * @param {Report} report
 */
function showIntervals(report) {
  const field = byId("chart-class-field", HTMLElement);
  const select = byId("chart-class", HTMLSelectElement);
  const classes = [...new Set(report.screenlines.flatMap(classNames))].sort();
  const kept = classes.includes(select.value) ? select.value : "";
  select.replaceChildren(el("option", { value: "", text: "all" }), ...classes.map((c) => el("option", { value: c, text: c })));
  select.value = kept;
  field.hidden = classes.length < 2;
  const draw = () => {
    const cls = select.value || null;
    byId("chart", HTMLElement).replaceChildren(chart(report, cls));
    byId("interval-table", HTMLElement).replaceChildren(intervalTable(report, cls));
  };
  select.onchange = draw;
  draw();
}

/**
 * An interval's count in one direction, for one class or (null) all.
 * @param {IntervalCount} iv
 * @param {"forward" | "backward"} dir
 * @param {string | null} cls
 */
function intervalCount(iv, dir, cls) {
  if (cls === null) return iv[dir];
  return iv.by_class[cls] ? iv.by_class[cls][dir] : 0;
}

/**
 * @param {Report} report
 * @param {string | null} only one class, or null for all
 */
function intervalTable(report, only) {
  /** @type {(string | number)[][]} */
  const rows = [];
  for (const line of report.screenlines) {
    for (const iv of line.intervals) {
      for (const [dir, label] of /** @type {const} */ ([["forward", line.forward_label], ["backward", line.backward_label]])) {
        const when = `${iv.start.slice(11, 16)}–${iv.end.slice(11, 16)}${iv.partial ? " (part)" : ""}`;
        const classes = only ? [only] : classNames(line);
        for (const cls of classes) rows.push([line.name, label, cls, when, intervalCount(iv, dir, cls)]);
        if (!only && classes.length !== 1) rows.push([line.name, label, "all", when, iv[dir]]);
      }
    }
  }
  return table(["Line", "Direction", "Class", "Interval", "Count"], rows, [4]);
}

/**
 * Bars per interval, one group per interval, one bar per line and direction (forward solid,
 * backward light); `cls` null for all classes, else that class only.
 * @param {Report} report
 * @param {string | null} cls
 */
function chart(report, cls) {
  const NS = "http://www.w3.org/2000/svg";
  /** @type {(tag: string, attrs: Record<string, string | number>, text?: string) => SVGElement} */
  const svg = (tag, attrs, text) => {
    const n = document.createElementNS(NS, tag);
    for (const [k, v] of Object.entries(attrs)) n.setAttribute(k, String(v));
    if (text !== undefined) n.textContent = text;
    return n;
  };
  /** @type {{name: string, colour: string, opacity: number, values: number[]}[]} */
  const series = [];
  report.screenlines.forEach((l, i) => {
    series.push({ name: `${l.name} ${l.forward_label}`, colour: planColour(i), opacity: 1, values: l.intervals.map((iv) => intervalCount(iv, "forward", cls)) });
    series.push({ name: `${l.name} ${l.backward_label}`, colour: planColour(i), opacity: 0.45, values: l.intervals.map((iv) => intervalCount(iv, "backward", cls)) });
  });
  const intervals = report.screenlines.length ? report.screenlines[0].intervals : [];
  const max = Math.max(1, ...series.flatMap((s) => s.values));
  const barW = 14;
  const groupW = Math.max(1, series.length) * barW + 16;
  const height = 160;
  const left = 34;
  const width = left + Math.max(1, intervals.length) * groupW + 10;
  const root = svg("svg", { viewBox: `0 0 ${width} ${height + 40}`, width, height: height + 40, role: "img", "aria-label": "Counts per interval" });
  for (const frac of [0, 0.5, 1]) {
    const y = height - frac * (height - 10);
    root.append(svg("line", { x1: left - 4, x2: width, y1: y, y2: y, stroke: "#d9d4c7" }));
    root.append(svg("text", { x: left - 6, y: y + 4, "text-anchor": "end", fill: "#5f6472" }, String(Math.round(frac * max))));
  }
  intervals.forEach((iv, k) => {
    const x0 = left + k * groupW + 8;
    series.forEach((s, j) => {
      const h = (s.values[k] / max) * (height - 10);
      const bar = svg("rect", { x: x0 + j * barW, y: height - h, width: barW - 2, height: h, fill: s.colour, "fill-opacity": s.opacity });
      bar.append(svg("title", {}, `${s.name}, ${iv.start.slice(11, 16)}: ${s.values[k]}`));
      root.append(bar);
    });
    root.append(svg("text", { x: x0, y: height + 14, fill: "#1d2330" }, iv.start.slice(11, 16)));
  });
  let lx = left;
  series.forEach((s) => {
    root.append(svg("rect", { x: lx, y: height + 24, width: 10, height: 10, fill: s.colour, "fill-opacity": s.opacity }));
    const t = svg("text", { x: lx + 13, y: height + 33, fill: "#1d2330" }, s.name);
    root.append(t);
    lx += 20 + s.name.length * 6;
  });
  root.setAttribute("viewBox", `0 0 ${Math.max(width, lx)} ${height + 40}`);
  root.setAttribute("width", String(Math.max(width, lx)));
  return root;
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

/** @param {Report} report */
function zones(report) {
  if (!report.zones.length) return [];
  const rows = report.zones.map((z) => [z.name, z.entries, z.exits, z.present_at_end, stat(z.dwell_seconds)]);
  return [el("h3", { text: "Zones" }), table(["Zone", "Entries", "Exits", "Inside at end", "Dwell s (median / mean / 85th)"], rows, [1, 2, 3])];
}

/** @param {Report} report */
function movements(report) {
  if (!report.movements.length) return [];
  const rows = report.movements.map((m) => [m.origin, m.destination, m.class || "unclassified", m.count, m.u_turn ? "yes" : ""]);
  return [el("h3", { text: "Movements (first line or zone met → last)" }), table(["From", "To", "Class", "Count", "U-turn"], rows, [3])];
}

/** @param {Report} report */
function speeds(report) {
  const s = report.speeds;
  if (!s) return [];
  const rows = Object.entries(s.by_class).map(([cls, v]) => [cls, v.count, stat(v)]);
  rows.push(["all", s.all.count, stat(s.all)]);
  return [el("h3", { text: `Speeds (${s.unit}/s)` }), table(["Class", "Tracks", "median / mean / 85th"], rows, [1])];
}
