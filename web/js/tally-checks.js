// @ts-check
// Each hand count kept (Review, Hand count) beside the tool's count of the same frames, as the core
// compared them (the report's `checks`, NCHRP Report 797's measures): per line, direction and
// class the counts, the difference, APD, AAPD, WAPD and the correction factor, with the sample's
// size and the caution the core words. Choosing a difference lists the tool's count events behind
// it, bin by bin, beside the presses, so the person can look at each on the footage and correct the
// tool (Review's edits) or count again. A correction factor is applied only when chosen here, and
// the page says so wherever counts are shown (Results too) until it is removed.

import { byId, el, clockText } from "./dom.js";
import { eventTime, eventWhat, eventTracks, directionGlyph } from "./review-events.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./review.js").Review} Review */
/** @typedef {import("./results.js").CountEvent} CountEvent */
/** @typedef {import("./tally.js").Tally} Tally */
/**
 * The measures over a group's bins (crate/core/src/report/checks.rs, Measures): null where there
 * is nothing to divide by.
 * @typedef {{intervals: number, zero_reference_intervals: number, automated_total: number, reference_total: number,
 *   apd: number | null, aapd: number | null, wapd: number | null, correction_factor: number | null}} Measures
 */
/**
 * One line, direction (the plan's label) and class (`all`: together) of a check; `per_bin`: each
 * bin's start label, the tool's count and the hand count.
 * @typedef {{screenline: string, direction: string, class: string, manual: number, automated: number, difference: number,
 *   measures: Measures, per_bin: [string, number, number][]}} TallyGroup
 */
/**
 * A tally beside the tool's count of the same frames (crate/core/src/report/checks.rs, TallyCheck).
 * @typedef {{who: string, made: string, from_frame: number, to_frame: number, from: string, to: string, seconds: number,
 *   bin_seconds: number, groups: TallyGroup[], overall: Measures, caution: string}} TallyCheck
 */
/** A correction factor applied: each line's counts multiplied by it. @typedef {{factor: number, reason?: string, adjusted: {screenline: string, forward: number, backward: number}[]}} AppliedCorrection */

/** @param {number | null} v a share, signed when `signed` */
function percent(v, signed = false) {
  if (v === null || v === undefined) return "n/a";
  const text = `${(100 * v).toFixed(1)}%`;
  return signed && v > 0 ? `+${text}` : text;
}

/** @param {number | null} v */
function factorText(v) {
  return v === null || v === undefined ? "n/a" : v.toFixed(3);
}

/** @param {number} d */
function signed(d) {
  return d > 0 ? `+${d}` : String(d);
}

export class TallyChecks {
  /**
   * @param {PageStore} store
   * @param {Review} review shows a count event or a moment on the footage
   */
  constructor(store, review) {
    this.store = store;
    this.review = review;
    this.root = byId("tally-checks", HTMLElement);
    /** @type {{tally: number, group: string} | null} the difference whose events are listed */
    this.open = null;
    /** @type {{index: number, tally: Tally, left: string} | null} the tally last deleted, while the others are as it left them (as JSON) */
    this.deleted = null;
    store.subscribe(["results", "checks"], () => this.show());
    store.subscribe(["results", "checks"], () => this.sayCorrection());
    this.show();
    this.sayCorrection();
  }

  show() {
    const tallies = this.store.handCount.tallies;
    const report = this.store.results ? this.store.results.report : null;
    const checks = report ? report.checks || [] : [];
    const parts = tallies.map((t, i) => this.card(t, i, checks.length === tallies.length ? checks[i] : null));
    this.root.replaceChildren(...(parts.length ? [el("h3", { text: "Hand counts kept" }), ...parts] : [el("p", { class: "empty-note", text: "No hand count yet. Count a sample above: it is kept with your name, saved in the project, and compared with the tool's count of the same frames." })]));
    if (this.deleted && this.deleted.left !== JSON.stringify(tallies)) this.deleted = null;
    const gone = this.deleted;
    if (gone) {
      const back = el("button", { type: "button", text: "Bring it back", onclick: () => { this.deleted = null; this.store.handCount.tallyRestored(gone.index, gone.tally); } });
      this.root.prepend(el("p", { class: "hint deleted-tally", role: "status" }, [`Hand count by ${gone.tally.who} deleted. `, back]));
    }
  }

  /**
   * @param {Tally} t the tally to delete
   * @param {number} i its place
   */
  remove(t, i) {
    this.store.handCount.tallyDeleted(i);
    this.deleted = { index: i, tally: t, left: JSON.stringify(this.store.handCount.tallies) };
    this.show();
  }

  /**
   * One tally and its comparison.
   * @param {Tally} t
   * @param {number} i
   * @param {TallyCheck | null} c
   */
  card(t, i, c) {
    const fps = this.store.fps;
    const lines = t.screenlines.length === this.store.plan.screenlines.length ? "all lines" : t.screenlines.join(", ");
    const head = `${t.who}, ${t.made.replace("T", " ")}`;
    const what = `${clockText((t.from_frame - 1) / fps)}–${clockText(t.to_frame / fps)} of the footage (frames ${t.from_frame} to ${t.to_frame}) · ${lines} · ${t.presses.length} press${t.presses.length === 1 ? "" : "es"}`;
    const remove = el("button", { type: "button", text: "Delete this hand count", onclick: () => this.remove(t, i) });
    const article = el("article", { class: "tally-check", "data-index": String(i) }, [el("h4", { text: `Hand count by ${head}` }), el("p", { class: "hint", text: what })]);
    if (!c) {
      article.append(el("p", { class: "hint", text: this.store.results ? "Comparing with the tool's count…" : "Press Run: it is then compared with the tool's count of the same frames." }), el("div", { class: "button-row" }, remove));
      return article;
    }
    const listing = el("div", { class: "bin-events" });
    article.append(this.measuresTable(c, t, i, listing), el("p", { class: "hint", text: sampleSize(c) }), el("p", { class: "caution", text: c.caution }), listing);
    article.append(el("div", { class: "button-row" }, [this.factorButton(c, t, article), remove]));
    return article;
  }

  /**
   * The groups and the pooled measures; each difference a button listing its events.
   * @param {TallyCheck} c
   * @param {Tally} t
   * @param {number} i
   * @param {HTMLElement} listing where the events go
   */
  measuresTable(c, t, i, listing) {
    const numbers = (/** @type {Measures} */ m, /** @type {number} */ manual, /** @type {number} */ tool) => [manual, tool, percent(m.apd, true), percent(m.aapd), percent(m.wapd), factorText(m.correction_factor)].map((v) => el("td", { class: "n", text: String(v) }));
    const rows = c.groups.map((g) => {
      const key = groupKey(g);
      const open = Boolean(this.open && this.open.tally === i && this.open.group === key);
      if (open) this.listEvents(c, t, g, listing);
      const b = el("button", { type: "button", class: `difference${g.difference ? " differs" : ""}`, text: signed(g.difference), "aria-expanded": String(open), "aria-label": `${signed(g.difference)}: show the tool's count events of ${g.screenline}, ${g.direction}, ${g.class} in this sample` });
      b.addEventListener("click", () => {
        this.open = open ? null : { tally: i, group: key };
        this.show();
      });
      const [manual, tool, ...measures] = numbers(g.measures, g.manual, g.automated);
      return el("tr", {}, [el("th", { scope: "row" }, groupName(g, this.store.plan)), manual, tool, el("td", { class: "n" }, b), ...measures]);
    });
    const o = c.overall;
    const [manual, tool, ...measures] = numbers(o, o.reference_total, o.automated_total);
    rows.push(el("tr", { class: "total" }, [el("th", { scope: "row", text: "All lines together" }), manual, tool, el("td", { class: "n", text: signed(o.automated_total - o.reference_total) }), ...measures]));
    const head = ["Line, direction, class", "By hand", "Tool", "Difference", "APD", "AAPD", "WAPD", "Factor"];
    const box = el("div", { class: "table-box" }, el("table", { class: "tally-table" }, [el("thead", {}, el("tr", {}, head.map((h, k) => el("th", { text: h, class: k ? "n" : null })))), el("tbody", {}, rows)]));
    return el("div", {}, [box, el("p", { class: "note", text: "Difference: the tool's count minus yours; choose one to see the tool's count events behind it. APD: the mean of (tool − you) / you over the bins (a bias); AAPD: the same without signs (the size of the error); WAPD: the sum of |tool − you| over the sum of yours; factor: yours over the tool's (NCHRP Report 797). n/a: nothing counted by hand to divide by." })]);
  }

  /**
   * The tool's count events behind one group's difference, bin by bin, beside the presses.
   * @param {TallyCheck} c
   * @param {Tally} t
   * @param {TallyGroup} g
   * @param {HTMLElement} into
   */
  listEvents(c, t, g, into) {
    const report = this.store.results ? this.store.results.report : null;
    if (!report) return;
    const line = report.screenlines.find((l) => l.name === g.screenline);
    const way = line && line.forward_label === g.direction ? "forward" : "backward";
    const fps = this.store.fps;
    const bins = g.per_bin.length;
    const binOf = (/** @type {number} */ f) => Math.min(bins - 1, Math.floor((f - c.from_frame) / fps / c.bin_seconds));
    const inSample = (/** @type {number} */ f) => f >= c.from_frame && f <= c.to_frame;
    const same = (/** @type {CountEvent} */ e) => e.kind === "screenline" && e.name === g.screenline && e.direction === way && (g.class === "all" || e.class === g.class) && inSample(e.frame);
    const events = report.events.filter(same);
    const rejected = (report.rejected_events || []).filter(same);
    const deleted = (report.deleted_events || []).filter(same);
    const presses = t.presses.filter((p) => p.screenline === g.screenline && p.direction === way && (g.class === "all" || p.class === g.class) && inSample(p.frame));
    /** @type {HTMLElement[]} */
    const parts = [el("p", { class: "hint", text: `${g.screenline}, ${g.direction}, ${g.class === "all" ? "all classes" : g.class}: the tool counted ${g.automated}, you ${g.manual}. Choose one to see it on the footage. Where the tool is wrong, reject its crossing (R) or add the one it missed (Events); where you were, count again.` })];
    g.per_bin.forEach(([start, a, m], b) => {
      if (bins > 1) parts.push(el("p", { class: "bin-head", text: `From ${start}: tool ${a}, you ${m}` }));
      const mine = events.filter((e) => binOf(e.frame) === b);
      const gone = rejected.filter((e) => binOf(e.frame) === b);
      const removed = deleted.filter((e) => binOf(e.frame) === b);
      const list = el("ol", { class: "review-list" }, [
        ...mine.map((e) => el("li", {}, this.eventButton(e, ""))),
        ...gone.map((e) => el("li", {}, this.eventButton(e, "rejected"))),
        ...removed.map((e) => el("li", {}, this.eventButton(e, "deleted"))),
      ]);
      const own = presses.filter((p) => binOf(p.frame) === b).map((p) => el("button", { type: "button", class: "press", text: `${clockText((p.frame - 1) / fps)} (frame ${p.frame})`, onclick: () => this.review.showMoment(p.frame, []) }));
      parts.push(mine.length ? list : el("p", { class: "hint", text: "The tool counted none here." }));
      if (!mine.length && (gone.length || removed.length)) parts.push(list);
      parts.push(el("p", { class: "presses" }, own.length ? ["Your presses: ", ...own] : ["You pressed none here."]));
    });
    into.replaceChildren(...parts);
  }

  /**
   * One of the tool's count events (or one the person rejected, or one a track they deleted
   * made), to see on the footage.
   * @param {CountEvent} e
   * @param {import("./review-events.js").Uncounted} uncounted
   */
  eventButton(e, uncounted) {
    const detail = [e.class || "unclassified", eventTracks(e), eventTime(e)];
    const why = e.reason ? `: ${e.reason}` : "";
    if (uncounted) detail.push(uncounted === "rejected" ? `rejected by you${why}` : `its track deleted by you${why}`);
    return el("button", { type: "button", class: uncounted ? "rejected" : null, onclick: () => this.review.showEvent(e) }, [
      el("span", { class: "when", text: clockText(e.seconds) }),
      el("span", { class: "what" }, [directionGlyph(e), eventWhat(e)]),
      el("span", { class: "detail", text: detail.join(" · ") }),
    ]);
  }

  /**
   * "Apply factor…": asks, then applies the check's pooled factor to the lines it counted.
   * @param {TallyCheck} c
   * @param {Tally} t
   * @param {HTMLElement} card
   */
  factorButton(c, t, card) {
    const f = c.overall.correction_factor;
    // No factor (nothing counted by the tool), or one that changes nothing: nothing to offer.
    if (f === null || f === undefined || Math.abs(f - 1) < 0.0005) return null;
    const lines = t.screenlines.join(" and ");
    const reason = el("input", { type: "text", autocomplete: "off", placeholder: "why (optional)" });
    const form = el("form", { class: "edit-form", hidden: true }, [
      el("p", { class: "form-head", text: `Apply a correction factor of ${f.toFixed(3)} to ${lines}? The counts stay as counted; the adjusted totals are shown beside them, in the report and in the client summary. ${sampleSize(c)}` }),
      el("label", {}, ["Why ", reason]),
      el("div", { class: "button-row" }, [el("button", { type: "submit", class: "primary", text: "Apply factor" }), el("button", { type: "button", text: "Cancel", onclick: () => { form.hidden = true; } })]),
    ]);
    form.addEventListener("submit", (e) => {
      e.preventDefault();
      /** @type {import("./tally.js").Correction} */
      const chosen = { factor: Number(f.toFixed(3)), screenlines: t.screenlines };
      if (reason.value.trim()) chosen.reason = reason.value.trim();
      this.store.handCount.correctionChosen(chosen);
    });
    card.append(form);
    return el("button", { type: "button", text: `Apply factor ${f.toFixed(3)}…`, onclick: () => { form.hidden = false; reason.focus(); } });
  }

  /** Says, under Hand count and in Results, whether a correction factor is applied and what it gives. */
  sayCorrection() {
    const chosen = this.store.handCount.correction;
    const report = this.store.results ? this.store.results.report : null;
    const applied = report ? report.correction || null : null;
    for (const id of ["tally-correction", "correction-note"]) {
      const p = byId(id, HTMLElement);
      const remove = el("button", { type: "button", text: "Remove correction factor", onclick: () => this.store.handCount.correctionChosen(null) });
      p.hidden = !chosen && !(id === "tally-correction" && this.store.handCount.tallies.length);
      if (!chosen) p.replaceChildren("No correction factor applied: the counts are as counted.");
      else p.replaceChildren(correctionWords(chosen, applied), " ", remove);
      p.classList.toggle("applied", Boolean(chosen));
    }
  }
}

/**
 * A group in words: the line, the direction with its glyph, and the class unless all.
 * @param {TallyGroup} g
 * @param {import("./plan.js").Plan} plan
 */
function groupName(g, plan) {
  const line = plan.screenlines.find((l) => l.name === g.screenline);
  const forward = !line || (line.forward || "forward") === g.direction;
  return [el("span", { class: "line-name", text: g.screenline }), " ", el("span", { class: `dir ${forward ? "forward" : "backward"}`, text: `${forward ? "\u25B2" : "\u25BC"} ${g.direction}` }), g.class === "all" ? "" : ` · ${g.class}`];
}

/** @param {TallyGroup} g */
function groupKey(g) {
  return `${g.screenline}\u0000${g.direction}\u0000${g.class}`;
}

/** @param {TallyCheck} c */
function sampleSize(c) {
  const length = c.seconds < 120 ? `${c.seconds.toFixed(1)} s` : `${(c.seconds / 60).toFixed(1)} minutes`;
  const bins = c.groups.length ? c.groups[0].per_bin.length : 1;
  return `Sample size: ${length} of footage (${c.from.slice(11) || c.from} to ${c.to.slice(11) || c.to}), ${c.overall.reference_total} crossings counted by hand, measured over ${bins} bin${bins === 1 ? "" : "s"} of ${c.bin_seconds} s.`;
}

/**
 * @param {import("./tally.js").Correction} chosen
 * @param {AppliedCorrection | null} applied what the core made of it, once counted
 */
function correctionWords(chosen, applied) {
  const why = chosen.reason ? ` (${chosen.reason})` : "";
  const lines = chosen.screenlines && chosen.screenlines.length ? chosen.screenlines.join(" and ") : "every line";
  const head = `A correction factor of ${chosen.factor.toFixed(3)}${why} is applied to ${lines}.`;
  if (!applied) return `${head} The adjusted totals follow once counted.`;
  const totals = applied.adjusted.map((a) => `${a.screenline} ${a.forward.toFixed(1)} forward, ${a.backward.toFixed(1)} backward`).join("; ");
  return `${head} Adjusted totals: ${totals}. The counts shown are as counted; the adjusted ones are beside them in the report and the client summary.`;
}
