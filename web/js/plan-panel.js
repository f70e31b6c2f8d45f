// @ts-check
// The Plan panel: drawing tools, the plan's settings (frame rate, start, interval, count point,
// crossing margin), its lines, zones and ground points, Undo / Save plan / Demo again, and what keeps
// the plan from being used. Every field is made once and updated in place as the plan changes.

import { byId, el, download, showValue } from "./dom.js";
import { planForCore, setHysteresis, setRule } from "./plan.js";
import { LineList, ZoneList, GroundPointList } from "./plan-lists.js";
import { itemNames } from "./palette.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./store.js").Tool} Tool */
/** @typedef {import("./plan.js").Plan} Plan */

/** @type {Record<Tool, string>} */
const TOOL_HINTS = {
  select: "Drag the ends of a line or the corners of a zone to move them. Click a line to select it; Delete removes it.",
  line: "Click where the line starts, then where it ends (hold Shift to add bends, Enter to finish). Its teeth mark the forward side. Escape cancels.",
  zone: "Click the corners; click the first corner again or press Enter to close the zone. Escape cancels.",
  calibration: "Click a point on the ground whose position you know, then type its ground X and Y under Ground points. Escape cancels.",
};

export class PlanPanel {
  /**
   * @param {PageStore} store
   * @param {import("./messages.js").Messages} messages
   * @param {{demoAgain: () => void}} actions `demoAgain`: opens the bundled demo and its plan again
   */
  constructor(store, messages, actions) {
    this.store = store;
    this.messages = messages;
    /** @param {(plan: Plan) => void} fn */
    const edit = (fn) => store.planEdited(fn);
    this.lines = new LineList(byId("line-list", HTMLElement), edit);
    this.zones = new ZoneList(byId("zone-list", HTMLElement), edit);
    this.ground = new GroundPointList(byId("calibration-list", HTMLElement), edit);
    this.fields = {
      frameRate: byId("frame-rate", HTMLInputElement),
      start: byId("start-time", HTMLInputElement),
      interval: byId("interval-minutes", HTMLInputElement),
      anchor: byId("anchor", HTMLSelectElement),
      hysteresis: byId("hysteresis", HTMLInputElement),
      smooth: byId("smooth-seconds", HTMLInputElement),
    };
    /** A plan file was just opened, and no problem with it said yet. */
    this.openedFile = false;
    this.toolButtons = [...document.querySelectorAll("[data-tool]")].filter((b) => b instanceof HTMLButtonElement);
    this.bindFields();
    this.bindButtons(actions);
    store.subscribe(["plan", "selection"], ({ changed, why }) => {
      if (changed.has("plan")) this.showSettings();
      this.showLists();
      if (changed.has("plan")) this.sayReplaced(why);
    });
    store.subscribe(["tool"], () => this.showTool());
    // Again when the plan's rate changes (after "Use", the offer still stood).
    store.subscribe(["frameRate", "plan"], () => this.showFrameRate());
    store.subscribe(["planProblem", "results"], ({ changed }) => {
      const stale = store.planRefused && store.results ? "\nThe counts shown are still those of the plan before this change." : "";
      byId("plan-error", HTMLElement).textContent = store.planProblem + stale;
      if (!changed.has("planProblem")) return;
      // A file just opened that needs a fix says so where it said "Plan opened" (a newcomer's
      // trial: the problem was only in the Plan panel, further down).
      if (this.openedFile && store.planProblem) this.sayReplaced("file", store.planProblem);
    });
    this.showSettings();
    this.showLists();
  }

  /** Each settings field edits its plan field when changed. */
  bindFields() {
    const f = this.fields;
    /** @param {string} v */
    const number = (v) => (v === "" ? null : Number(v));
    /** @type {[HTMLInputElement | HTMLSelectElement, (plan: Plan, value: string) => void][]} */
    const bindings = [
      [f.frameRate, (p, v) => setOrDelete(p, "frame_rate", number(v))],
      [f.start, (p, v) => setOrDelete(p, "start", v ? (v.length === 16 ? `${v}:00` : v) : null)],
      [f.interval, (p, v) => setOrDelete(p, "interval_minutes", number(v))],
      [f.anchor, (p, v) => { p.anchor = v; }],
      [f.hysteresis, (p, v) => setHysteresis(p, number(v))],
      [f.smooth, (p, v) => setRule(p, "smooth_seconds", number(v))],
    ];
    for (const [input, set] of bindings) {
      input.addEventListener("change", () => {
        const value = input.value;
        this.store.planEdited((p) => set(p, value));
      });
    }
  }

  /** @param {{demoAgain: () => void}} actions */
  bindButtons(actions) {
    for (const b of this.toolButtons) b.addEventListener("click", () => this.store.toolChosen(/** @type {Tool} */ (b.dataset.tool)));
    byId("undo", HTMLButtonElement).addEventListener("click", () => this.store.planUndone());
    byId("save-plan", HTMLButtonElement).addEventListener("click", () => download("plan.json", planForCore(this.store.plan).json, "application/json"));
    byId("load-demo", HTMLButtonElement).addEventListener("click", () => actions.demoAgain());
  }

  /**
   * The rules' defaults as the fields' placeholders, and the most the core takes as the fields'
   * maximums: from the core's own constants once the engine has started (the page's own copies
   * in index.html show until then).
   * @param {import("./protocol.js").CoreFacts} facts
   */
  showDefaults(facts) {
    const { hysteresis, smooth } = this.fields;
    hysteresis.placeholder = String(facts.default_hysteresis);
    hysteresis.max = String(facts.max_hysteresis);
    smooth.placeholder = String(facts.default_smooth_seconds);
    smooth.max = String(facts.max_smooth_seconds);
  }

  showSettings() {
    const plan = this.store.plan;
    const f = this.fields;
    showValue(f.frameRate, String(plan.frame_rate ?? ""));
    showValue(f.start, plan.start ?? "");
    showValue(f.interval, String(plan.interval_minutes ?? 15));
    showValue(f.anchor, plan.anchor || "bottom");
    showValue(f.hysteresis, plan.rules && plan.rules.hysteresis !== undefined ? String(plan.rules.hysteresis) : "");
    showValue(f.smooth, plan.rules && plan.rules.smooth_seconds !== undefined ? String(plan.rules.smooth_seconds) : "");
  }

  showLists() {
    const { plan, selected, keyColours } = this.store;
    const names = itemNames(plan);
    /** @param {string} name */
    const keyColour = (name) => keyColours.colour(name, names);
    this.lines.show(plan, selected, keyColour);
    this.zones.show(plan, selected, keyColour);
    this.ground.show(plan);
  }

  /**
   * A plan opened from a file, or the demo's, can be undone from its message; a file's that needs
   * a fix says what.
   * @param {string} why
   * @param {string} [problem]
   */
  sayReplaced(why, problem = "") {
    this.openedFile = why === "file" && !problem;
    if (why !== "file" && why !== "demo") return;
    const said = problem ? `Plan opened, but it cannot be used in full until this is fixed (in the file, or here under Plan). ${problem} ` : why === "file" ? "Plan opened. " : "The demo plan is back. ";
    this.messages.say("plan-replaced", problem ? "warn" : "ok", said, [
      el("button", { type: "button", text: "Undo", onclick: () => { this.store.planUndone(); this.messages.clear("plan-replaced"); } }),
    ]);
  }

  showTool() {
    const tool = this.store.tool;
    for (const b of this.toolButtons) b.setAttribute("aria-pressed", String(b.dataset.tool === tool));
    byId("tool-hint", HTMLElement).textContent = TOOL_HINTS[tool];
  }

  /**
   * Compares the footage's own frame rate (measured from playback or from the decoded frames' times)
   * with the plan's, and offers the correction when they differ by more than 1%: the plan's rate
   * turns frames into times and so into intervals.
   */
  showFrameRate() {
    const measured = this.store.measuredRate;
    if (!measured) return;
    const { rate, how } = measured;
    const fps = this.store.fps;
    const hint = byId("fps-hint", HTMLElement);
    if (Math.abs(rate - fps) / fps > 0.01) {
      hint.replaceChildren(`The footage ${how} about ${rate.toFixed(2)} fps, not ${fps}. `,
        el("button", { type: "button", text: `Use ${rate.toFixed(2)}`, onclick: () => this.store.planEdited((p) => (p.frame_rate = Number(rate.toFixed(3)))) }));
    } else {
      hint.textContent = `The footage ${how} ${rate.toFixed(2)} fps, as set.`;
    }
  }

  /**
   * Puts the keyboard in ground point `i`'s X.
   * @param {number} i
   */
  focusGround(i) {
    this.ground.focusGround(i);
  }
}

/**
 * @param {Plan} plan
 * @param {"frame_rate" | "start" | "interval_minutes"} key
 * @param {number | string | null} value null: the field is removed (the core's default applies)
 */
function setOrDelete(plan, key, value) {
  const fields = /** @type {Record<string, unknown>} */ (/** @type {unknown} */ (plan));
  if (value === null) delete fields[key];
  else fields[key] = value;
}
