// @ts-check
// Counts per interval as bar charts, one small chart per line so that every line keeps the same two
// marks: forward as solid orange bars, backward as blue hatched bars (told apart by pattern as well as
// colour), named in a legend with the line's own direction names. The count axis has whole-number
// ticks at 1, 2 or 5 times a power of ten, from 0 to at least the largest count.

import { el } from "./dom.js";
import { DIRECTION_COLOUR } from "./palette.js";

/** @typedef {import("./results.js").Report} Report */
/** @typedef {import("./results.js").ScreenlineReport} ScreenlineReport */
/** @typedef {import("./results.js").IntervalCount} IntervalCount */

const NS = "http://www.w3.org/2000/svg";
const SIZE = { height: 120, top: 10, left: 38, bar: 16, gap: 20, bottom: 34 };

/**
 * How an interval's start is written under its bars: hours and minutes, with seconds when
 * intervals are shorter than a minute.
 * @param {IntervalCount[]} intervals
 */
export function startFormat(intervals) {
  const seconds = intervals.some((iv, k) => k > 0 && clockPart(iv.start).slice(0, 5) === clockPart(intervals[k - 1].start).slice(0, 5));
  return (/** @type {string} */ iso) => clockPart(iso).slice(0, seconds ? 8 : 5);
}

/**
 * Whether a moment's time is a clock time (the plan has a start), not the time since the footage began.
 * @param {string | undefined | null} time
 */
export function isClock(time) {
  return Boolean(time && time.length > 10);
}

/**
 * The time of day of an interval's bound: of "2026-03-02T07:15:00" its "07:15:00"; a plan with no
 * start time gives the time since the footage began as it is ("00:15:00").
 * @param {string} bound
 */
export function clockPart(bound) {
  return bound.length > 10 ? bound.slice(11) : bound;
}

/**
 * Ticks for a count axis: whole numbers from 0, evenly spaced by 1, 2 or 5 times a power of ten,
 * about `target` steps, the last at or above `max`.
 * @param {number} max the largest count shown
 * @param {number} [target]
 * @returns {number[]}
 */
export function niceTicks(max, target = 5) {
  if (!(max > 0)) return [0, 1];
  const raw = max / target;
  const magnitude = 10 ** Math.floor(Math.log10(raw));
  const step = Math.max(1, [1, 2, 5, 10].map((m) => m * magnitude).find((s) => s >= raw) || 1);
  const top = Math.ceil(max / step) * step;
  const ticks = [];
  for (let v = 0; v <= top; v += step) ticks.push(v);
  return ticks;
}

/**
 * An SVG element.
 * @param {string} tag
 * @param {Record<string, string | number>} attrs
 * @param {string} [text]
 */
function svg(tag, attrs, text) {
  const n = document.createElementNS(NS, tag);
  for (const [k, v] of Object.entries(attrs)) n.setAttribute(k, String(v));
  if (text !== undefined) n.textContent = text;
  return n;
}

/**
 * An interval's count in one direction, for one class or (null) all.
 * @param {IntervalCount} iv
 * @param {"forward" | "backward"} dir
 * @param {string | null} cls
 */
export function intervalCount(iv, dir, cls) {
  if (cls === null) return iv[dir];
  return iv.by_class[cls] ? iv.by_class[cls][dir] : 0;
}

/**
 * One chart per line, with its legend; `cls` null for all classes, else that class only.
 * @param {Report} report
 * @param {string | null} cls
 * @param {(name: string) => string} keyColour
 */
export function intervalCharts(report, cls, keyColour) {
  const charts = report.screenlines.map((line, i) => lineChart(line, i, cls, keyColour(line.name)));
  const partial = report.screenlines.some((l) => l.intervals.some((iv) => iv.partial));
  if (partial) charts.push(el("p", { class: "note", text: "“part”: the footage ends before this interval does, so its count covers only part of it." }));
  return charts;
}

/**
 * @param {ScreenlineReport} line
 * @param {number} i
 * @param {string | null} cls
 * @param {string} key the line's key colour
 */
function lineChart(line, i, cls, key) {
  const values = {
    forward: line.intervals.map((iv) => intervalCount(iv, "forward", cls)),
    backward: line.intervals.map((iv) => intervalCount(iv, "backward", cls)),
  };
  const ticks = niceTicks(Math.max(0, ...values.forward, ...values.backward));
  const top = ticks[ticks.length - 1];
  const when = startFormat(line.intervals);
  // Room under each pair of bars for its start time, with seconds where they are shown.
  const groupW = Math.max(2 * SIZE.bar + SIZE.gap, when(line.intervals.length ? line.intervals[0].start : "").length * 6.6 + 8);
  const width = SIZE.left + Math.max(1, line.intervals.length) * groupW + 8;
  const height = SIZE.top + SIZE.height + SIZE.bottom;
  const name = `${line.name}: crossings per interval, ${line.forward_label} and ${line.backward_label}`;
  const root = svg("svg", { viewBox: `0 0 ${width} ${height}`, width, height, role: "img", "aria-label": name });
  root.append(hatch(`hatch-${i}`));
  /** @param {number} v */
  const y = (v) => SIZE.top + SIZE.height - (v / top) * SIZE.height;
  for (const t of ticks) {
    root.append(svg("line", { x1: SIZE.left - 4, x2: width, y1: y(t), y2: y(t), stroke: t ? "#e4dfd3" : "#1d2330" }));
    root.append(svg("text", { class: "tick", x: SIZE.left - 7, y: y(t) + 4, "text-anchor": "end", fill: "#5a5f6c" }, String(t)));
  }
  line.intervals.forEach((iv, k) => {
    const x0 = SIZE.left + k * groupW + (groupW - 2 * SIZE.bar) / 2;
    bar(root, x0, y, values.forward[k], "forward", `${line.forward_label}, ${when(iv.start)}: ${values.forward[k]}`, DIRECTION_COLOUR.forward);
    bar(root, x0 + SIZE.bar, y, values.backward[k], "backward", `${line.backward_label}, ${when(iv.start)}: ${values.backward[k]}`, `url(#hatch-${i})`);
    const label = svg("text", { x: x0 + SIZE.bar, y: SIZE.top + SIZE.height + 14, "text-anchor": "middle", fill: "#1d2330" }, when(iv.start));
    root.append(label);
    if (iv.partial) root.append(svg("text", { x: x0 + SIZE.bar, y: SIZE.top + SIZE.height + 27, "text-anchor": "middle", fill: "#5a5f6c" }, "part"));
  });
  /** @param {string} label @param {string} dir */
  const named = (label, dir) => (label === dir ? label : `${label} (${dir})`);
  const legend = el("ul", { class: "legend" }, [
    el("li", {}, [el("span", { class: "swatch forward" }), el("span", { class: "dir forward", "aria-hidden": "true", text: "\u25B2 " }), named(line.forward_label, "forward")]),
    el("li", {}, [el("span", { class: "swatch backward" }), el("span", { class: "dir backward", "aria-hidden": "true", text: "\u25BC " }), named(line.backward_label, "backward")]),
  ]);
  const keyMark = el("span", { "aria-hidden": "true", text: "\u25A0 " });
  keyMark.style.color = key;
  return el("figure", {}, [el("figcaption", {}, [keyMark, line.name, el("span", { class: "hint", text: " · crossings per interval" })]), legend, root]);
}

/**
 * A bar from 0 to `value`, titled for a pointer or a screen reader.
 * @param {SVGElement} root
 * @param {number} x
 * @param {(v: number) => number} y
 * @param {number} value
 * @param {"forward" | "backward"} dir
 * @param {string} title
 * @param {string} fill
 */
function bar(root, x, y, value, dir, title, fill) {
  const h = y(0) - y(value);
  const rect = svg("rect", { class: `bar ${dir}`, x, y: y(value), width: SIZE.bar - 2, height: Math.max(0, h), fill, stroke: DIRECTION_COLOUR[dir], "stroke-width": 1 });
  rect.append(svg("title", {}, title));
  root.append(rect);
}

/**
 * Diagonal blue lines on white: the backward bars' fill.
 * @param {string} id
 */
function hatch(id) {
  const pattern = svg("pattern", { id, width: 5, height: 5, patternUnits: "userSpaceOnUse", patternTransform: "rotate(45)" });
  pattern.append(svg("rect", { width: 5, height: 5, fill: "#ffffff" }));
  pattern.append(svg("rect", { width: 2.2, height: 5, fill: DIRECTION_COLOUR.backward }));
  const defs = svg("defs", {});
  defs.append(pattern);
  return defs;
}
