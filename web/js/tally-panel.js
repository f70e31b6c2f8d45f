// @ts-check
// Counting a sample by hand (Review, Hand count): who counts, the stretch of footage (from, to; the
// whole footage when it lasts five minutes or less, else five minutes from the frame shown), the
// lines; then, while the tally runs, one key per line and direction (written on a button for each,
// which also counts when pressed, for screens without keys, and drawn on the picture beside each
// line's sides), Backspace to take back the last press, and the running counts. Playback stops at
// the sample's end; a press outside the sample is refused and said so. Finished, the tally is kept
// (hand-count.js) and the core compares it (tally-checks.js shows how).

import { byId, el, clockText, showValue, Rows } from "./dom.js";
import { itemNames } from "./palette.js";
import { tallyKeys, parseTime, defaultSample, localStamp, runningCounts, keyFor, UNDO_KEY } from "./tally.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./picture.js").Picture} Picture */
/** @typedef {import("./tally.js").TallyKey} TallyKey */
/** @typedef {{root: HTMLButtonElement, kbd: HTMLElement, what: HTMLElement, count: HTMLElement}} KeyRow */

export class TallyPanel {
  /**
   * @param {PageStore} store
   * @param {Picture} picture
   */
  constructor(store, picture) {
    this.store = store;
    this.picture = picture;
    this.form = byId("tally-form", HTMLFormElement);
    this.who = byId("tally-who", HTMLInputElement);
    this.from = byId("tally-from", HTMLInputElement);
    this.to = byId("tally-to", HTMLInputElement);
    this.lines = byId("tally-lines", HTMLSelectElement);
    this.sampleNote = byId("tally-sample", HTMLElement);
    this.error = byId("tally-error", HTMLElement);
    this.live = byId("tally-live", HTMLElement);
    this.status = byId("tally-status", HTMLElement);
    this.cls = byId("tally-class", HTMLSelectElement);
    /** A note said after the last press or refusal, kept until the next one. */
    this.note = "";
    this.keys = new Rows(byId("tally-keys", HTMLElement), () => this.keyRow());
    this.listen();
    store.subscribe(["plan"], () => this.offerLines());
    store.subscribe(["detections", "tracks", "results"], () => this.offerClasses());
    store.subscribe(["reviewTab", "view", "video", "detections"], () => this.offerSample());
    store.subscribe(["tally"], () => this.showRun());
    store.subscribe(["tallyPress", "frame"], () => this.showCounts());
    store.subscribe(["frame"], () => this.stopAtEnd());
    store.subscribe(["checks", "results"], () => this.countKept());
    this.countKept();
    this.offerLines();
    this.showRun();
  }

  /** The number of tallies kept, on the tab. */
  countKept() {
    const n = this.store.handCount.tallies.length;
    byId("tally-count", HTMLElement).textContent = n ? `${n}` : "";
  }

  listen() {
    this.form.addEventListener("submit", (e) => { e.preventDefault(); this.start(); });
    for (const field of [this.from, this.to]) field.addEventListener("input", () => this.sayFrames());
    byId("tally-from-here", HTMLButtonElement).addEventListener("click", () => this.setTime(this.from, (this.store.frame - 1) / this.store.fps));
    byId("tally-to-here", HTMLButtonElement).addEventListener("click", () => this.setTime(this.to, this.store.frame / this.store.fps));
    byId("tally-undo", HTMLButtonElement).addEventListener("click", () => this.undo());
    byId("tally-finish", HTMLButtonElement).addEventListener("click", () => this.finish());
    byId("tally-drop", HTMLButtonElement).addEventListener("click", () => {
      const run = this.store.handCount.run;
      const n = run ? run.tally.presses.length : 0;
      if (n && !window.confirm(`Discard this hand count and its ${n} press${n === 1 ? "" : "es"}? It is not kept, and Undo does not bring it back.`)) return;
      this.store.handCount.tallyDropped();
      this.say("Discarded: that hand count was not kept.");
    });
  }

  /**
   * @param {HTMLInputElement} field
   * @param {number} seconds
   */
  setTime(field, seconds) {
    field.value = clockText(seconds);
    this.sayFrames();
  }

  /** The lines to choose from: all, or one. The choice is kept while that line is in the plan. */
  offerLines() {
    const names = this.store.plan.screenlines.map((l) => l.name);
    const kept = names.includes(this.lines.value) ? this.lines.value : "";
    this.lines.replaceChildren(el("option", { value: "", text: "all lines" }), ...names.map((n) => el("option", { value: n, text: n })));
    this.lines.value = kept;
  }

  /** The classes a press may carry: those of the detections and of the counts. */
  offerClasses() {
    const { detections, results } = this.store;
    const classes = new Set(detections ? detections.summary.classes : []);
    for (const l of results ? results.report.screenlines : []) for (const c of Object.keys(l.by_class)) classes.add(c);
    const kept = classes.has(this.cls.value) ? this.cls.value : "";
    this.cls.replaceChildren(el("option", { value: "", text: "not said (all classes together)" }), ...[...classes].sort().map((c) => el("option", { value: c, text: c })));
    this.cls.value = kept;
  }

  /** With Hand count open and no sample typed yet, the sample offered first. */
  offerSample() {
    const { view, reviewTab, fps, lastFrame } = this.store;
    if (view !== "review" || reviewTab !== "tally" || this.from.value || this.to.value) return;
    const { from, to } = defaultSample(this.store.frame, lastFrame, fps);
    showValue(this.from, clockText((from - 1) / fps));
    showValue(this.to, clockText(to / fps));
    this.sayFrames();
  }

  /**
   * The sample typed, in frames (1-based, inclusive), or what is wrong with it.
   * @returns {{from: number, to: number} | string}
   */
  sample() {
    const { fps, lastFrame } = this.store;
    const from = parseTime(this.from.value);
    const to = parseTime(this.to.value);
    if (from === null) return "Type when the sample starts as minutes:seconds (like 0:15) or in seconds.";
    if (to === null) return "Type when the sample ends as minutes:seconds (like 0:45) or in seconds.";
    // Frame f is on screen from (f − 1)/fps to f/fps: the sample holds the frames that start from
    // `from` and end by `to` (to the nearest frame).
    const a = Math.max(1, Math.round(from * fps) + 1);
    const b = Math.min(lastFrame, Math.round(to * fps));
    if (a > lastFrame) return `The footage ends at ${clockText(lastFrame / fps)}: start the sample before that.`;
    if (b < a) return "The sample must end after it starts.";
    return { from: a, to: b };
  }

  sayFrames() {
    const s = this.sample();
    this.sampleNote.textContent = typeof s === "string" ? "" : `Frames ${s.from} to ${s.to}: ${((s.to - s.from + 1) / this.store.fps).toFixed(1)} s of footage.`;
  }

  start() {
    const store = this.store;
    const who = this.who.value.trim();
    const s = this.sample();
    const names = this.lines.value ? [this.lines.value] : store.plan.screenlines.map((l) => l.name);
    const problem = !who ? "Type your name first: each hand count is kept with who made it." : typeof s === "string" ? s : !names.length ? "The plan has no lines to count: draw one under Set up." : "";
    this.error.textContent = problem;
    if (problem || typeof s === "string") {
      (who ? this.from : this.who).focus();
      return;
    }
    const { keys, missing } = tallyKeys(store.plan, names);
    store.focusChosen(null);
    this.picture.pause();
    this.note = missing ? `${missing} line directions have no key: count fewer lines at a time.` : "";
    store.handCount.tallyStarted({ tally: { who, made: localStamp(new Date()), from_frame: s.from, to_frame: s.to, screenlines: names, presses: [] }, keys });
    this.picture.seekFrame(s.from);
    this.live.focus();
    this.bringIntoView();
  }

  /**
   * A tally gone on with after a reload, shown: the footage at its last press (or its start), so
   * counting goes on where it stopped, and the keys in view.
   */
  resumedShown() {
    const run = this.store.handCount.run;
    if (!run) return;
    const presses = run.tally.presses;
    this.picture.seekFrame(presses.length ? presses[presses.length - 1].frame : run.tally.from_frame);
    this.live.focus();
    this.bringIntoView();
  }

  /**
   * On a narrow screen the footage stays at the top while reviewing: the tally's status and keys
   * are brought just under it, so both are in view while counting (a newcomer's trial: the keys
   * were below the fold, and scrolling slid them under the footage).
   */
  bringIntoView() {
    const viewer = document.querySelector(".viewer");
    if (!(viewer instanceof HTMLElement) || getComputedStyle(viewer).position !== "sticky") return;
    window.scrollBy(0, this.live.getBoundingClientRect().top - viewer.getBoundingClientRect().bottom - 6);
  }

  /** The form while no tally runs; the keys and counts while one does. */
  showRun() {
    const run = this.store.handCount.run;
    this.form.hidden = Boolean(run);
    this.live.hidden = !run;
    if (!run) return;
    const colour = (/** @type {string} */ name) => this.store.keyColours.colour(name, itemNames(this.store.plan));
    this.keys.show(run.keys.length, (row, i) => {
      const k = run.keys[i];
      row.kbd.textContent = k.key.toUpperCase();
      row.what.replaceChildren(el("span", { class: "line-name", text: k.screenline }), " ", el("span", { class: `dir ${k.direction}`, text: `${k.direction === "forward" ? "\u25B2" : "\u25BC"} ${k.label}` }));
      row.root.style.setProperty("--swatch", colour(k.screenline));
      row.root.dataset.key = k.key;
      row.root.setAttribute("aria-label", `${k.screenline}, ${k.label} (key ${k.key.toUpperCase()})`);
    });
    this.showCounts();
  }

  /** @returns {KeyRow} */
  keyRow() {
    const kbd = el("kbd");
    const what = el("span", { class: "what" });
    const count = el("span", { class: "count" });
    const root = el("button", { type: "button", class: "tally-key" }, [kbd, what, count]);
    root.addEventListener("click", (e) => {
      this.press(root.dataset.key || "");
      // Clicked or tapped, it lets go of the focus: Space then plays, as everywhere, instead of pressing it again.
      if (e.detail > 0) root.blur();
    });
    return { root, kbd, what, count };
  }

  showCounts() {
    const run = this.store.handCount.run;
    if (!run) return;
    const counts = runningCounts(run);
    this.keys.rows.forEach((row, i) => { row.count.textContent = String(counts.get(run.keys[i].key) || 0); });
    const { from_frame: a, to_frame: b, presses } = run.tally;
    const f = this.store.frame;
    const fps = this.store.fps;
    const where = f < a ? "before the sample" : f > b ? "past the sample's end" : `${clockText((f - 1) / fps)}`;
    this.status.textContent = `${run.tally.who} counting ${clockText((a - 1) / fps)}–${clockText(b / fps)} · frame ${f}, ${where} · ${presses.length} press${presses.length === 1 ? "" : "es"}${this.note ? ` · ${this.note}` : ""}`;
  }

  /** Playing past the sample's end stops there. */
  stopAtEnd() {
    const run = this.store.handCount.run;
    if (run && this.picture.playing && this.store.frame >= run.tally.to_frame) {
      this.picture.pause();
      this.say("End of the sample: Finish and compare, or step back to check.");
    }
  }

  /**
   * A press of a line's key (or its button), at the frame shown.
   * @param {string} key
   */
  press(key) {
    const run = this.store.handCount.run;
    const k = run ? keyFor(run, key) : undefined;
    if (!run || !k) return;
    const f = this.store.frame;
    if (f < run.tally.from_frame || f > run.tally.to_frame) return this.say(`Not counted: frame ${f} is outside the sample (frames ${run.tally.from_frame} to ${run.tally.to_frame}).`);
    /** @type {import("./tally.js").Press} */
    const press = { frame: f, screenline: k.screenline, direction: k.direction };
    if (this.cls.value) press.class = this.cls.value;
    this.note = `${k.screenline} ${k.label} at frame ${f}`;
    this.store.handCount.tallyPressed(press);
  }

  undo() {
    const gone = this.store.handCount.tallyPressUndone();
    this.say(gone ? `Taken back: ${gone.screenline} ${gone.direction === "forward" ? "\u25B2" : "\u25BC"} at frame ${gone.frame}.` : "No press to take back.");
  }

  finish() {
    const run = this.store.handCount.run;
    if (!run) return;
    this.store.handCount.tallyFinished();
    const n = run.tally.presses.length;
    this.error.textContent = "";
    this.sampleNote.textContent = `Kept: ${run.tally.who}'s count, ${n} crossing${n === 1 ? "" : "s"}. It is compared with the tool's count below${this.store.results ? "" : " once you press Run"}. Someone else can count the same sample now.`;
    this.who.value = "";
  }

  /** @param {string} words */
  say(words) {
    this.note = words;
    this.showCounts();
  }

  /**
   * A key pressed on the page while a tally runs; true when it was the tally's (a line's key, or
   * Backspace). Keys typed into a text field are the field's.
   * @param {KeyboardEvent} e
   */
  handleKey(e) {
    const run = this.store.handCount.run;
    // Under Review only, where the tally's keys and counts are shown (elsewhere a press went unseen).
    if (!run || this.store.view !== "review" || e.ctrlKey || e.metaKey || e.altKey) return false;
    const t = e.target instanceof Element ? e.target : null;
    if (t && (t.closest("select, textarea") || (t instanceof HTMLInputElement && !["range", "checkbox", "radio", "button"].includes(t.type)))) return false;
    if (e.key === UNDO_KEY) {
      this.undo();
      return true;
    }
    if (!keyFor(run, e.key)) return false;
    this.press(e.key);
    return true;
  }
}
