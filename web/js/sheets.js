// @ts-check
// The core's hand-in tables, shown as they are copied: tab-separated text (crate/core/src/handin)
// read back into rows of cells and laid out as tables (clock times shown without the date, which
// the header block gives). The text is made of blocks parted by an
// empty row: the header block (site, recording, plan, files, caution), then the tables, then notes
// (the peak hour and its factor under the grid). Nothing is counted here; every cell is the core's.

import { el } from "./dom.js";

/** @typedef {string[][]} Block rows of cells */

/**
 * Tab-separated text as blocks of rows of cells, parted where a row is empty.
 * @param {string} text
 * @returns {Block[]}
 */
export function blocks(text) {
  /** @type {Block[]} */
  const out = [[]];
  for (const line of text.replace(/\n$/, "").split("\n")) {
    if (line === "") out.push([]);
    else out[out.length - 1].push(line.split("\t"));
  }
  return out.filter((b) => b.length);
}

/**
 * The size of tab-separated text as a spreadsheet pastes it: rows, and the most cells in a row.
 * @param {string} text
 */
export function shape(text) {
  const rows = text.replace(/\n$/, "").split("\n");
  return { rows: rows.length, cells: Math.max(...rows.map((r) => r.split("\t").length)) };
}

/** @param {string} cell */
function numeric(cell) {
  return /^-?\d+(\.\d+)?$/.test(cell);
}

/**
 * A cell as shown: a clock time of the recording's day without its date (the header block gives
 * the date; the files and the copy keep it whole).
 * @param {string} cell
 */
function shown(cell) {
  const m = cell.match(/^\d{4}-\d{2}-\d{2}T(\d{2}:\d{2})(:\d{2})$/);
  return m ? m[1] + (m[2] === ":00" ? "" : m[2]) : cell;
}

/**
 * A table of a block whose first row names the columns. Rows whose `mark` cell says so are marked
 * (the peak hour's intervals); a row starting "Total" is the totals row.
 * @param {Block} block
 * @param {{column: string, value: string} | null} mark
 * @param {string} caption
 */
function sheetTable(block, mark, caption) {
  const [head, ...rows] = block;
  const at = mark ? head.indexOf(mark.column) : -1;
  const cells = (/** @type {string[]} */ r, /** @type {"td" | "th"} */ tag) => r.map((c, i) => el(i === 0 && tag === "td" ? "th" : tag, { text: shown(c), title: shown(c) === c ? null : c, class: numeric(c) ? "n" : null, scope: i === 0 && tag === "td" ? "row" : null }));
  const box = el("div", { class: "table-box sheet-box" }, el("table", {}, [
    el("caption", { class: "visually-hidden", text: caption }),
    el("thead", {}, el("tr", {}, cells(head, "th"))),
    el("tbody", {}, rows.map((r) => {
      const peak = at >= 0 && mark && r[at] === mark.value;
      return el("tr", { class: peak ? "peak" : r[0] === "Total" ? "total" : null }, cells(r, "td"));
    })),
  ]));
  return el("div", {}, [box, wideNote(box, head.length)]);
}

/**
 * A line under a table wider than its box saying that it scrolls sideways, shown only while it
 * is wider (the panel's width changes with the window, and is 0 while the tab is hidden).
 * @param {HTMLElement} box
 * @param {number} columns
 */
function wideNote(box, columns) {
  const note = el("p", { class: "hint wide-note", hidden: true, text: `\u2194 ${columns} columns, more than the panel shows: scroll the table sideways (or copy or download it) to see them all.` });
  new ResizeObserver(() => { note.hidden = box.scrollWidth <= box.clientWidth + 1; }).observe(box);
  return note;
}

/**
 * The header block: what was counted, where, from what, and the caution.
 * @param {Block} block
 */
function headerBlock(block) {
  return el("dl", { class: "sheet-head" }, block.flatMap(([name, value]) => [el("dt", { text: name }), el("dd", { text: value || "" })]));
}

/**
 * The interval grid (either layout): the header block, the table with the peak hour's intervals
 * marked and the totals row, and the peak hour and its factor below.
 * @param {string} tab the grid as tab-separated text
 * @returns {HTMLElement[]}
 */
export function gridView(tab) {
  const [head, table, ...notes] = blocks(tab);
  if (!table) return head ? [headerBlock(head)] : [];
  const long = table[0][0] === "interval_start";
  const mark = long ? { column: "peak_hour", value: "yes" } : { column: "Peak hour", value: "peak" };
  // A plan of zones only: the zones' block comes straight after the header.
  const zonesOnly = isZones(table);
  const out = [headerBlock(head), ...(zonesOnly ? zonesTable(table) : [sheetTable(table, mark, "Counts per interval")])];
  for (const rows of notes) {
    if (isZones(rows)) {
      out.push(...zonesTable(rows));
      continue;
    }
    for (const r of rows) out.push(el("p", { class: "peak-note" }, [el("strong", { text: `${r[0]}: ` }), r.slice(1).filter(Boolean).join(", ")]));
  }
  return out;
}

/**
 * Whether a block of the grid is the zones' entries and exits (crate/core/src/handin/zone_grid.rs,
 * its title row).
 * @param {string[][]} rows
 */
function isZones(rows) {
  return rows.length > 1 && rows[0].length === 1 && rows[0][0].startsWith("Zones: entries and exits");
}

/**
 * The zones' block as a heading and a table.
 * @param {string[][]} rows its title row, then the table
 * @returns {HTMLElement[]}
 */
function zonesTable(rows) {
  const [title, ...table] = rows;
  return [el("h4", { text: title[0] }), sheetTable(table, null, title[0])];
}

/**
 * The movement matrices: for all classes, then each class (from rows, to columns, totals), and
 * the paths with no destination.
 * @param {string} tab the matrix as tab-separated text
 * @returns {HTMLElement[]}
 */
export function matrixView(tab) {
  const [, ...rest] = blocks(tab);
  /** @type {HTMLElement[]} */
  const out = [];
  for (const b of rest) {
    if (b.length === 1) {
      out.push(el("p", { class: "hint", text: b[0].join(": ") }));
      continue;
    }
    const [title, ...table] = b;
    out.push(el("h4", { text: title[0] }), sheetTable(table, null, title[0]));
  }
  return out;
}
