// @ts-check
// The evidence sheet: one line's (or zone's) count events on a printable page, each with its
// picture cut from the footage here, its time, direction, class, track and what is special about
// it (counted while hidden, added by hand, rejected and why), headed with the site, footage and
// plan, so a client or an auditor can check every count by eye. Printing it prints the sheet alone.

import { clockPart, isClock } from "./chart.js";
import { el, byId, clockText, localStamp } from "./dom.js";
import { eventTracks } from "./review-events.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./evidence.js").Evidence} Evidence */
/** @typedef {import("./results.js").CountEvent} CountEvent */
/** @typedef {import("./results.js").Report} Report */

export class EvidenceSheet {
  /**
   * @param {PageStore} store
   * @param {Evidence} evidence
   */
  constructor(store, evidence) {
    this.store = store;
    this.evidence = evidence;
    this.item = byId("evidence-item", HTMLSelectElement);
    this.make = byId("make-evidence", HTMLButtonElement);
    this.print = byId("print-evidence", HTMLButtonElement);
    this.status = byId("evidence-status", HTMLElement);
    this.sheet = byId("evidence-sheet", HTMLElement);
    this.make.addEventListener("click", () => this.build());
    this.print.addEventListener("click", () => this.printSheet());
    window.addEventListener("afterprint", () => { delete document.body.dataset.print; });
    store.subscribe(["results"], () => this.offerItems());
  }

  /** The lines and zones of the counts; the one chosen stays chosen while it is there. */
  offerItems() {
    const report = this.store.results ? this.store.results.report : null;
    const kept = this.item.value;
    const names = report ? [...report.screenlines.map((l) => l.name), ...report.zones.map((z) => z.name)] : [];
    this.item.replaceChildren(...names.map((n) => el("option", { value: n, text: n })));
    if (names.includes(kept)) this.item.value = kept;
    this.make.disabled = !names.length;
    // A sheet made from other counts is put away: it would no longer match them.
    this.sheet.hidden = true;
    this.print.disabled = true;
  }

  /** Makes the sheet of the chosen line or zone, pictures and all. */
  async build() {
    const report = this.store.results ? this.store.results.report : null;
    const name = this.item.value;
    if (!report || !name) return;
    const events = [...report.events, ...(report.rejected_events || [])].filter((e) => e.name === name).sort((a, b) => a.seconds - b.seconds);
    const rejected = new Set(report.rejected_events || []);
    this.make.disabled = true;
    this.print.disabled = true;
    const rows = events.map((e) => this.row(e, rejected.has(e)));
    this.sheet.replaceChildren(...this.head(report, name), el("div", { class: "table-box" }, el("table", {}, [
      el("thead", {}, el("tr", {}, ["Picture", "Time", "Direction", "Class", "Track", "Notes"].map((h) => el("th", { text: h })))),
      el("tbody", {}, rows.map((r) => r.tr)),
    ])), el("p", { class: "caution", text: report.caution }));
    this.sheet.hidden = false;
    let done = 0;
    for (const r of rows) {
      this.status.textContent = `Cutting pictures from the footage: ${done} of ${rows.length}…`;
      await r.picture;
      done++;
    }
    this.status.textContent = `Evidence sheet of ${name}: ${events.length} events${this.evidence.available() ? ", each with its picture" : " (no footage open: no pictures)"}. Print it, or save it as PDF from the print dialogue.`;
    this.make.disabled = false;
    this.print.disabled = false;
  }

  /**
   * The sheet's heading: what, where, from which files, and the counts it backs.
   * @param {Report} report
   * @param {string} name
   */
  head(report, name) {
    const line = report.screenlines.find((l) => l.name === name);
    const zone = report.zones.find((z) => z.name === name);
    const counts = line ? `${line.forward_label}: ${line.forward} · ${line.backward_label}: ${line.backward}${line.added ? ` · added by hand: ${line.added}` : ""}${line.rejected ? ` · rejected: ${line.rejected}` : ""}` : zone ? `entries: ${zone.entries} · exits: ${zone.exits}` : "";
    const site = this.store.work.site;
    const footage = this.store.footage ? this.store.footage.name : "no footage open";
    return [
      el("h2", { text: `Evidence: ${name}${site ? ` · ${site}` : ""}` }),
      el("p", { class: "hint", text: `Footage: ${footage} · plan: ${this.store.planName} · made ${localStamp(new Date())}` }),
      el("p", { text: `Counts: ${counts}. Every count event is listed below with a picture of what was counted, cut from the footage on this computer.` }),
    ];
  }

  /**
   * One event's row, and its picture on its way.
   * @param {CountEvent} e
   * @param {boolean} rejected
   */
  row(e, rejected) {
    const img = el("img", { class: "evidence-picture", alt: `${e.name}, ${e.label || e.direction}, ${clockText(e.seconds)}`, width: 112, height: 112 });
    const notes = [];
    if (e.inferred) notes.push("counted while hidden");
    if (e.added) notes.push("added by hand");
    if (rejected) notes.push("rejected: not counted");
    if (e.reason) notes.push(`why: ${e.reason}`);
    const when = isClock(e.time) ? `${clockText(e.seconds)} (${clockPart(e.time)})` : clockText(e.seconds);
    const picture = this.evidence.picture(e).then((url) => {
      if (!url) return img.replaceWith("no picture");
      // Where it was cut from, for whoever checks the picture against the footage.
      const crop = this.evidence.crops.get(url);
      if (crop) img.dataset.crop = `${crop.join(",")},${e.frame}`;
      return shown(img, url);
    });
    const tr = el("tr", { class: rejected ? "rejected" : null }, [
      el("td", {}, img), el("td", { text: `${when} · frame ${e.frame}` }), el("td", { text: e.label || e.direction }),
      el("td", { text: e.class || "unclassified" }), el("td", { text: eventTracks(e) }), el("td", { text: notes.join("; ") }),
    ]);
    return { tr, picture };
  }

  printSheet() {
    document.body.dataset.print = "evidence";
    window.print();
  }
}

/**
 * Resolves once the image has shown `url` (or failed to).
 * @param {HTMLImageElement} img
 * @param {string} url
 * @returns {Promise<void>}
 */
function shown(img, url) {
  return new Promise((resolve) => {
    img.addEventListener("load", () => resolve(), { once: true });
    img.addEventListener("error", () => resolve(), { once: true });
    img.src = url;
  });
}
