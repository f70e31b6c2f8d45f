// The report, shown: totals per line and direction, counts per interval (chart and table), zones,
// movements, speeds, and the list of count events that every number comes from.

import { el, table, clockText } from "./dom.js";
import { planColour } from "./geometry.js";

const MAX_EVENTS_SHOWN = 2000;

export function showResults(root, report, onEvent) {
  root.hidden = false;
  root.querySelector("#caution").textContent = report.caution;
  const t = report.tracker;
  const trackerText = t ? ` Tracked with ${t.method}.` : "";
  root.querySelector("#summary").replaceChildren(
    el("p", { class: "hint", text: `${report.tracks_counted} tracks counted (fragments of one path joined) over ${report.frame_count} frames (${clockText(report.duration_seconds)}).${trackerText}` }),
    totals(report),
  );
  showIntervals(root, report);
  root.querySelector("#zones-table").replaceChildren(...zones(report));
  root.querySelector("#movements-table").replaceChildren(...movements(report));
  root.querySelector("#speeds-table").replaceChildren(...speeds(report));
  const events = root.querySelector("#events");
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

function eventText(e) {
  const time = e.time ? e.time.slice(11) : clockText(e.seconds);
  const what = e.kind === "screenline" ? `${e.name}: ${e.label}` : `${e.name}: ${e.direction}`;
  const ids = e.track_ids && e.track_ids.length > 1 ? `tracks ${e.track_ids.join("+")}` : `track ${e.track}`;
  return `${time} · frame ${e.frame} · ${what} · ${e.class || "unclassified"} · ${ids}${e.inferred ? " · inferred" : ""}`;
}

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

function classNames(line) {
  return Object.keys(line.by_class).sort();
}

/**
 * The chart and the interval table, for all classes or the one chosen in the class list (shown
 * when the report has more than one class). The choice is kept while that class is in the report.
 */
function showIntervals(root, report) {
  const field = root.querySelector("#chart-class-field");
  const select = root.querySelector("#chart-class");
  const classes = [...new Set(report.screenlines.flatMap(classNames))].sort();
  const kept = classes.includes(select.value) ? select.value : "";
  select.replaceChildren(el("option", { value: "", text: "all" }), ...classes.map((c) => el("option", { value: c, text: c })));
  select.value = kept;
  field.hidden = classes.length < 2;
  const draw = () => {
    const cls = select.value || null;
    root.querySelector("#chart").replaceChildren(chart(report, cls));
    root.querySelector("#interval-table").replaceChildren(intervalTable(report, cls));
  };
  select.onchange = draw;
  draw();
}

/** An interval's count in one direction, for one class or (null) all. */
function intervalCount(iv, dir, cls) {
  if (cls === null) return iv[dir];
  return iv.by_class[cls] ? iv.by_class[cls][dir] : 0;
}

function intervalTable(report, only) {
  const rows = [];
  for (const line of report.screenlines) {
    for (const iv of line.intervals) {
      for (const [dir, label] of [["forward", line.forward_label], ["backward", line.backward_label]]) {
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
 */
function chart(report, cls) {
  const NS = "http://www.w3.org/2000/svg";
  const svg = (tag, attrs, text) => {
    const n = document.createElementNS(NS, tag);
    for (const [k, v] of Object.entries(attrs)) n.setAttribute(k, v);
    if (text !== undefined) n.textContent = text;
    return n;
  };
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
  root.setAttribute("width", Math.max(width, lx));
  return root;
}

function stat(s) {
  return s && s.count ? `${s.median.toFixed(1)} / ${s.mean.toFixed(1)} / ${s.p85.toFixed(1)}` : "–";
}

function zones(report) {
  if (!report.zones.length) return [];
  const rows = report.zones.map((z) => [z.name, z.entries, z.exits, z.present_at_end, stat(z.dwell_seconds)]);
  return [el("h3", { text: "Zones" }), table(["Zone", "Entries", "Exits", "Inside at end", "Dwell s (median / mean / 85th)"], rows, [1, 2, 3])];
}

function movements(report) {
  if (!report.movements.length) return [];
  const rows = report.movements.map((m) => [m.origin, m.destination, m.class || "unclassified", m.count, m.u_turn ? "yes" : ""]);
  return [el("h3", { text: "Movements (first line or zone met → last)" }), table(["From", "To", "Class", "Count", "U-turn"], rows, [3])];
}

function speeds(report) {
  const s = report.speeds;
  if (!s) return [];
  const rows = Object.entries(s.by_class).map(([cls, v]) => [cls, v.count, stat(v)]);
  rows.push(["all", s.all.count, stat(s.all)]);
  return [el("h3", { text: `Speeds (${s.unit}/s)` }), table(["Class", "Tracks", "median / mean / 85th"], rows, [1])];
}
