// @ts-check
// The review's list of corrections, in the order made, each in plain words with what became of it
// when the core applied it ("applied", or "not applied" and why), and a button to take any one of
// them back (after a reload too, when Undo has nothing left). Undo and Redo step through them
// (the counts follow at once); Export edits gives the edits file that `throughline run --edits`
// replays. Choosing one shows its moment.

import { el, byId, clockText, download } from "./dom.js";
import { editWords, outcomeOf, editFrame, editTracks, marksOfRejection } from "./edits.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./core-client.js").CoreClient} CoreClient */
/** @typedef {import("./edits.js").Edit} Edit */

export class EditList {
  /**
   * @param {PageStore} store
   * @param {CoreClient} client
   * @param {(frame: number, tracks: number[]) => void} show the footage at this frame, these tracks in focus
   */
  constructor(store, client, show) {
    this.store = store;
    this.show = show;
    this.list = byId("edit-list", HTMLElement);
    this.badge = byId("edits-count", HTMLElement);
    this.empty = byId("edits-empty", HTMLElement);
    this.undo = byId("undo-edit", HTMLButtonElement);
    this.redo = byId("redo-edit", HTMLButtonElement);
    this.exportButton = byId("export-edits", HTMLButtonElement);
    this.undo.addEventListener("click", () => store.correctionsUndone());
    this.redo.addEventListener("click", () => store.correctionsRedone());
    this.exportButton.addEventListener("click", async () => download("edits.json", await client.editsText(), "application/json"));
    store.subscribe(["edits", "marks", "results", "plan", "checks"], () => this.render());
    this.render();
  }

  render() {
    const { work, results } = this.store;
    const outcomes = results ? results.report.edits : undefined;
    const wording = {
      label: (/** @type {string} */ line, /** @type {"forward" | "backward"} */ way) => directionLabel(this.store, line, way),
      clock: (/** @type {number} */ f) => clockText((f - 1) / this.store.fps),
    };
    this.list.replaceChildren(...work.edits.map((e, i) => {
      const status = statusOf(outcomeOf(work.edits, outcomes, i), Boolean(results));
      const b = el("button", { type: "button", onclick: () => this.show(editFrame(e), editTracks(e)) }, [
        el("span", { class: "when", text: `${i + 1}.` }),
        el("span", { class: "what", text: editWords(e, wording) }),
        el("span", { class: "detail" }, [e.reason ? el("span", { class: "why", text: `Why: ${e.reason}` }) : null, el("span", { class: `status ${status.tone}`, text: status.text })]),
      ]);
      const remove = el("button", { type: "button", class: "remove", text: "Remove", "aria-label": `Remove correction ${i + 1}`, title: "Take this correction back (Undo brings it back)",
        onclick: () => this.store.correctionRemoved(i, marksOfRejection(e, this.store.doubts, work.marks)) });
      return el("li", { class: "edit" }, [b, remove]);
    }));
    // How many corrections the counts shown are made with (-1: counting, or not counted yet).
    const counted = results && (outcomes || []).length === work.edits.length && work.edits.every((_, i) => outcomeOf(work.edits, outcomes, i));
    this.list.dataset.counted = String(counted ? work.edits.length : -1);
    this.badge.textContent = work.edits.length ? `${work.edits.length}` : "";
    this.empty.hidden = work.edits.length > 0;
    this.undo.disabled = !work.undoStack.length;
    this.redo.disabled = !work.redoStack.length;
    this.exportButton.disabled = !work.edits.length;
  }
}

/**
 * An edit's status in words.
 * @param {import("./edits.js").Outcome | null} outcome
 * @param {boolean} counted whether there are counts (tracks and a plan)
 * @returns {{text: string, tone: string}}
 */
function statusOf(outcome, counted) {
  if (!outcome) return { text: counted ? "counting\u2026" : "not applied yet: press Run to track, then it is applied", tone: "waiting" };
  if (outcome.applied) return { text: `applied: ${outcome.note}`, tone: "applied" };
  return { text: `not applied: ${outcome.note}`, tone: "missed" };
}

/**
 * A line's name for a direction, as the plan labels it ("westbound"), else "forward" or "backward".
 * @param {PageStore} store
 * @param {string} line
 * @param {"forward" | "backward"} way
 */
export function directionLabel(store, line, way) {
  const l = store.plan.screenlines.find((s) => s.name === line);
  return (l && l[way]) || way;
}
