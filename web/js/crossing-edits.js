// @ts-check
// Corrections of the counts themselves: a counted crossing (or a zone's entry or exit) rejected (it
// is wrong: a double count, a jitter), and a crossing the tool missed added by hand, on a line of
// the plan, in one of its directions (named by its labels), for a class, at the frame shown (and
// likewise an entry or exit of a zone). An added crossing sits where
// the track in focus meets the line, when a track is in focus there; otherwise the core puts it in
// the middle of the line's first segment. Choosing a track offers its class and the way it moves
// across the line.

import { byId, clockText, el } from "./dom.js";
import { withReason } from "./edits.js";
import { countPoint } from "./tracks.js";
import { forwardSide } from "./geometry.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./results.js").CountEvent} CountEvent */
/** @typedef {import("./geometry.js").Point} Point */

/**
 * The edit that rejects a counted crossing, or a zone's counted entry or exit; null for what cannot
 * be rejected (one added by hand: Undo takes that back).
 * @param {CountEvent | null} e
 * @returns {import("./edits.js").RejectEdit | import("./edits.js").RejectZoneEdit | null}
 */
export function rejectEdit(e) {
  if (!e || e.added) return null;
  if (e.kind === "zone" && (e.direction === "entry" || e.direction === "exit")) {
    return { edit: "reject_zone_event", zone: e.name, way: e.direction, track: e.track, frame: e.frame };
  }
  if (e.kind !== "screenline") return null;
  if (e.direction !== "forward" && e.direction !== "backward") return null;
  return { edit: "reject_crossing", screenline: e.name, direction: e.direction, track: e.track, frame: e.frame };
}

/**
 * Adding an entry to or exit from a zone that the tool missed, at the frame shown, for a class
 * (the class of the track in focus, when one is chosen). Shown when the plan has zones.
 */
export class AddZoneEventForm {
  /** @param {PageStore} store */
  constructor(store) {
    this.store = store;
    this.root = byId("add-zone-event", HTMLElement);
    this.zone = byId("add-zone", HTMLSelectElement);
    this.way = byId("add-zone-way", HTMLSelectElement);
    this.cls = byId("add-zone-class", HTMLInputElement);
    this.reason = byId("add-zone-reason", HTMLInputElement);
    this.at = byId("add-zone-at", HTMLElement);
    this.done = byId("add-zone-done", HTMLElement);
    byId("add-zone-form", HTMLFormElement).addEventListener("submit", (e) => { e.preventDefault(); this.add(); });
    /** @type {number | null} the track whose class the form last took */
    this.followed = null;
    store.subscribe(["plan"], () => this.offerZones());
    store.subscribe(["frame"], () => this.showWhere());
    store.subscribe(["focus"], () => this.followFocus());
    this.offerZones();
  }

  /** The class of a track newly in focus (what the person has typed since stays). */
  followFocus() {
    const { focus, tracks } = this.store;
    const id = focus && focus.tracks.length ? focus.tracks[0] : null;
    if (id === null || id === this.followed || !tracks) return;
    this.followed = id;
    const cls = tracks.classes.get(id);
    if (cls) this.cls.value = cls;
  }

  /** The plan's zones; the one chosen stays chosen while it is there. */
  offerZones() {
    const kept = this.zone.value;
    const names = this.store.plan.zones.map((z) => z.name);
    this.zone.replaceChildren(...names.map((n) => el("option", { value: n, text: n })));
    if (names.includes(kept)) this.zone.value = kept;
    this.root.hidden = names.length === 0;
    this.showWhere();
  }

  showWhere() {
    const f = this.store.frame;
    this.at.textContent = `At frame ${f} (${clockText((f - 1) / this.store.fps)}), the frame shown; drawn in the middle of the zone.`;
  }

  add() {
    const zone = this.zone.value;
    const cls = this.cls.value.trim();
    if (!zone) return void (this.done.textContent = "The plan has no zone to add an entry or exit to.");
    if (!cls) return void (this.done.textContent = "Say who went in or out: a class, such as pedestrian.");
    const way = this.way.value === "exit" ? "exit" : "entry";
    /** @type {import("./edits.js").AddZoneEdit} */
    const edit = { edit: "add_zone_event", zone, way, class: cls, frame: this.store.frame };
    this.store.correctionMade(withReason(edit, this.reason.value));
    this.reason.value = "";
    this.done.textContent = `Added: ${way === "entry" ? "an entry to" : "an exit from"} ${zone}, a ${cls}, at frame ${edit.frame}. The counts include it.`;
  }
}

export class AddCrossingForm {
  /** @param {PageStore} store */
  constructor(store) {
    this.store = store;
    this.form = byId("add-crossing-form", HTMLFormElement);
    this.line = byId("add-line", HTMLSelectElement);
    this.direction = byId("add-direction", HTMLSelectElement);
    this.cls = byId("add-class", HTMLInputElement);
    this.reason = byId("add-reason", HTMLInputElement);
    this.at = byId("add-at", HTMLElement);
    this.done = byId("add-done", HTMLElement);
    this.line.addEventListener("change", () => {
      this.lineChosen = true;
      this.offerDirections();
      this.followFocus("line");
    });
    /** Whether the person chose the line themselves since the track was chosen (it then stays). */
    this.lineChosen = false;
    this.direction.addEventListener("change", () => { this.wayChosen = true; });
    /** @type {number | null} the track whose class, line and way the form last took */
    this.followed = null;
    /** Whether the person chose the way themselves since (it then stays). */
    this.wayChosen = false;
    this.form.addEventListener("submit", (e) => { e.preventDefault(); this.add(); });
    store.subscribe(["plan"], () => this.offerLines());
    store.subscribe(["frame", "focus", "tracks"], () => this.showWhere());
    store.subscribe(["focus"], () => this.followFocus("focus"));
    store.subscribe(["frame"], () => this.followFocus("frame"));
    this.offerLines();
  }

  /**
   * A track chosen: the form offers its class, the line nearest it at the frame shown, and the way
   * it moves across that line around that frame (a newcomer's trial: a cyclist going backward was
   * offered as a pedestrian going forward). The class once for a track (the counts coming back make
   * the focus anew, and what the person has typed since stays); the line and the way follow the
   * frame shown until the person chooses them.
   * @param {"focus" | "line" | "frame"} why
   */
  followFocus(why) {
    const { focus, tracks } = this.store;
    const id = focus && focus.tracks.length ? focus.tracks[0] : null;
    if (id === null || !tracks) {
      this.followed = null;
      return;
    }
    if (id !== this.followed) {
      if (why !== "focus") return;
      this.followed = id;
      this.wayChosen = false;
      this.lineChosen = false;
      const cls = tracks.classes.get(id);
      if (cls) this.cls.value = cls;
    }
    if (!this.lineChosen) this.chooseNearestLine(id);
    if (!this.wayChosen) this.followWay(id);
  }

  /** @param {number} id the track in focus: the line nearest its count point at the frame shown is chosen */
  chooseNearestLine(id) {
    const { tracks, plan, frame } = this.store;
    if (!tracks) return;
    /** @type {Point | null} */
    let at = null;
    tracks.forEachBox(frame, (t, x, y, w, h) => { if (t === id) at = countPoint(x, y, w, h, plan.anchor); });
    const p = /** @type {Point | null} */ (at);
    if (!p) return;
    let best = { name: "", d: Infinity };
    for (const l of plan.screenlines) {
      if (l.points.length < 2) continue;
      const [qx, qy] = nearestOnLine(l.points, p);
      const d = Math.hypot(qx - p[0], qy - p[1]);
      if (d < best.d) best = { name: l.name, d };
    }
    if (best.name && best.name !== this.line.value) {
      this.line.value = best.name;
      this.offerDirections();
    }
  }

  /** @param {number} id the track in focus: the way it moves across the chosen line within two seconds either side of the frame shown */
  followWay(id) {
    const { tracks, plan, frame, fps } = this.store;
    const line = plan.screenlines.find((l) => l.name === this.line.value);
    const side = line ? forwardSide(line.points) : null;
    const reach = Math.max(1, Math.round(2 * fps));
    const path = tracks ? tracks.paths(frame - reach, frame + reach, plan.anchor, new Set([id])).get(id) : undefined;
    if (!side || !path || path.pts.length < 2) return;
    const [a, b] = [path.pts[0], path.pts[path.pts.length - 1]];
    const across = (b[0] - a[0]) * side.normal[0] + (b[1] - a[1]) * side.normal[1];
    if (across !== 0) this.direction.value = across > 0 ? "forward" : "backward";
  }

  /** The plan's lines; the one chosen stays chosen while it is there. */
  offerLines() {
    const kept = this.line.value;
    const names = this.store.plan.screenlines.map((l) => l.name);
    this.line.replaceChildren(...names.map((n) => el("option", { value: n, text: n })));
    if (names.includes(kept)) this.line.value = kept;
    this.offerDirections();
  }

  /** The chosen line's two directions, by their labels. */
  offerDirections() {
    const line = this.store.plan.screenlines.find((l) => l.name === this.line.value);
    const kept = this.direction.value;
    this.direction.replaceChildren(
      el("option", { value: "forward", text: line && line.forward ? `${line.forward} (forward)` : "forward" }),
      el("option", { value: "backward", text: line && line.backward ? `${line.backward} (backward)` : "backward" }),
    );
    if (kept) this.direction.value = kept;
    this.showWhere();
  }

  /** The frame the crossing will be added at, and where on the line. */
  showWhere() {
    const f = this.store.frame;
    const at = this.position();
    const where = at ? `where track ${at.track} meets the line` : "in the middle of the line's first segment (choose a track first to place it where that track crosses)";
    this.at.textContent = `At frame ${f} (${clockText((f - 1) / this.store.fps)}), the frame shown; ${where}.`;
  }

  /**
   * Where the track in focus meets the chosen line at the frame shown: its count point, moved to the
   * nearest point of the line. Null with no track in focus there.
   * @returns {{x: number, y: number, track: number} | null}
   */
  position() {
    const { focus, tracks, plan, frame } = this.store;
    const line = plan.screenlines.find((l) => l.name === this.line.value);
    if (!focus || !tracks || !line || line.points.length < 2) return null;
    /** @type {{x: number, y: number, track: number} | null} */
    let found = null;
    tracks.forEachBox(frame, (id, x, y, w, h) => {
      if (found || !focus.tracks.includes(id)) return;
      const [px, py] = nearestOnLine(line.points, countPoint(x, y, w, h, plan.anchor));
      found = { x: Math.round(px * 10) / 10, y: Math.round(py * 10) / 10, track: id };
    });
    return found;
  }

  add() {
    const screenline = this.line.value;
    const cls = this.cls.value.trim();
    if (!screenline) return void (this.done.textContent = "The plan has no line to add a crossing to.");
    if (!cls) return void (this.done.textContent = "Say what crossed: a class, such as pedestrian.");
    const direction = this.direction.value === "backward" ? "backward" : "forward";
    const at = this.position();
    /** @type {import("./edits.js").AddEdit} */
    const edit = { edit: "add_crossing", screenline, direction, class: cls, frame: this.store.frame };
    if (at) Object.assign(edit, { x: at.x, y: at.y });
    this.store.correctionMade(withReason(edit, this.reason.value));
    this.reason.value = "";
    this.done.textContent = `Added: ${screenline}, ${this.direction.selectedOptions[0].text}, a ${cls}, at frame ${edit.frame}. The counts include it.`;
  }
}

/**
 * The point of a polyline nearest to p.
 * @param {Point[]} pts
 * @param {Point} p
 * @returns {Point}
 */
export function nearestOnLine(pts, p) {
  let best = pts[0];
  let bestD = Infinity;
  for (let j = 0; j + 1 < pts.length; j++) {
    const [a, b] = [pts[j], pts[j + 1]];
    const [dx, dy] = [b[0] - a[0], b[1] - a[1]];
    const len2 = dx * dx + dy * dy;
    const t = len2 ? Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2)) : 0;
    /** @type {Point} */
    const q = [a[0] + t * dx, a[1] + t * dy];
    const d = Math.hypot(q[0] - p[0], q[1] - p[1]);
    if (d < bestD) [best, bestD] = [q, d];
  }
  return best;
}
