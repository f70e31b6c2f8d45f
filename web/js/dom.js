// @ts-check
// Building DOM without HTML strings, so names from files can never become markup; and small helpers
// for views that update the page in place rather than rebuild it.

/** @typedef {Node | string | null | undefined} Child */

/**
 * A new element. `props`: `text` (its text), `class`, `on<event>` (a listener), properties of the
 * element given as non-strings, anything else an attribute (true: present, false/null: absent).
 * @template {keyof HTMLElementTagNameMap} K
 * @param {K} tag
 * @param {Record<string, unknown>} [props]
 * @param {Child | Child[]} [children]
 * @returns {HTMLElementTagNameMap[K]}
 */
export function el(tag, props = {}, children = []) {
  const node = document.createElement(tag);
  const fields = /** @type {Record<string, unknown>} */ (/** @type {unknown} */ (node));
  for (const [k, v] of Object.entries(props)) {
    if (v === undefined || v === null || v === false) continue;
    if (k === "text") node.textContent = String(v);
    else if (k === "class") node.className = String(v);
    else if (k.startsWith("on")) node.addEventListener(k.slice(2), /** @type {EventListener} */ (v));
    else if (k in node && typeof v !== "string") fields[k] = v;
    else node.setAttribute(k, v === true ? "" : String(v));
  }
  for (const c of Array.isArray(children) ? children : [children]) if (c !== null && c !== undefined) node.append(c);
  return node;
}

/**
 * The page's element with this id, checked to be of the kind the code expects.
 * @template {Element} T
 * @param {string} id
 * @param {{new (): T, prototype: T}} type e.g. HTMLInputElement
 * @returns {T}
 */
export function byId(id, type) {
  const node = document.getElementById(id);
  if (!(node instanceof type)) throw new Error(`the page has no ${type.name} with id "${id}"`);
  return node;
}

/**
 * Sets a field's value unless it already shows it or the person is typing in it (a value typed but
 * not yet committed with Enter, Tab or a click elsewhere is theirs, not the plan's).
 * @param {HTMLInputElement | HTMLSelectElement} field
 * @param {string} value
 */
export function showValue(field, value) {
  if (field.value === value) return;
  if (document.activeElement === field && typing.has(field)) return;
  field.value = value;
}

/** Fields typed in since their last change event. */
const typing = new WeakSet();
document.addEventListener("input", (e) => { if (e.target instanceof Element) typing.add(e.target); }, true);
document.addEventListener("change", (e) => { if (e.target instanceof Element) typing.delete(e.target); }, true);

/**
 * Rows of a list kept in step with a number of items, keyed by index: a row that stays is updated in
 * place (so a field being typed in, or the control that has the focus, is never replaced); rows are
 * only added or removed at the end when the number of items changes.
 * @template {{root: HTMLElement}} R
 */
export class Rows {
  /**
   * @param {HTMLElement} container
   * @param {(index: number) => R} make a new row for item `index`
   * @param {Node | null} [tail] an element kept after the rows (a hint), or null
   */
  constructor(container, make, tail = null) {
    this.container = container;
    this.make = make;
    this.tail = tail;
    /** @type {R[]} */
    this.rows = [];
  }

  /**
   * Makes the list `count` rows long and calls `update(row, index)` for each.
   * @param {number} count
   * @param {(row: R, index: number) => void} update
   */
  show(count, update) {
    while (this.rows.length > count) this.rows.pop()?.root.remove();
    while (this.rows.length < count) {
      const row = this.make(this.rows.length);
      this.container.insertBefore(row.root, this.tail);
      this.rows.push(row);
    }
    this.rows.forEach(update);
  }
}

/**
 * Scrolls a list that scrolls on its own so that `item` is in view, without scrolling the page
 * (which would move the footage away).
 * @param {HTMLElement} list
 * @param {HTMLElement} item
 */
export function revealInList(list, item) {
  const l = list.getBoundingClientRect();
  const r = item.getBoundingClientRect();
  if (r.top < l.top) list.scrollTop -= l.top - r.top;
  else if (r.bottom > l.bottom) list.scrollTop += r.bottom - l.bottom;
}

/**
 * A table of text cells in a box that scrolls sideways when the table is wider than the page;
 * columns listed in `numeric` are right-aligned.
 * @param {string[]} headers
 * @param {(string | number)[][]} rows
 * @param {number[]} [numeric]
 */
export function table(headers, rows, numeric = []) {
  return el("div", { class: "table-box" }, el("table", {}, [
    el("thead", {}, el("tr", {}, headers.map((h, i) => el("th", { text: h, class: numeric.includes(i) ? "n" : null })))),
    el("tbody", {}, rows.map((r) => el("tr", {}, r.map((c, i) => el("td", { text: String(c), class: numeric.includes(i) ? "n" : null }))))),
  ]));
}

/**
 * Offers `text` to the user as a file download; nothing leaves the computer.
 * @param {string} name
 * @param {string} text
 * @param {string} type
 */
export function download(name, text, type) {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = el("a", { href: url, download: name });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10000);
}

/**
 * "m:ss.cc" for a time in seconds.
 * @param {number} seconds
 */
export function clockText(seconds) {
  const s = Math.max(0, seconds);
  const m = Math.floor(s / 60);
  return `${m}:${(s - m * 60).toFixed(2).padStart(5, "0")}`;
}

/**
 * A moment on this computer's clock as a date and time anyone reads alike: "2026-12-05 07:58"
 * (the browser's own format can put the day or the month first).
 * @param {Date} d
 */
export function localStamp(d) {
  const two = (/** @type {number} */ n) => String(n).padStart(2, "0");
  return `${d.getFullYear()}-${two(d.getMonth() + 1)}-${two(d.getDate())} ${two(d.getHours())}:${two(d.getMinutes())}`;
}
