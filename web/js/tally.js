// @ts-check
// A hand count (a tally) as the project file holds it (docs/project.schema.json, `tallies`): who
// counted, when, the sample's frames, the lines counted and one press per crossing seen. Here are
// the keys a tally uses (one per line and direction), the sample's times read from what a person
// types, and the running counts of a tally under way. Nothing here compares: the core puts each
// finished tally beside the automated count (the report's `checks`).

/** @typedef {"forward" | "backward"} Way */
/** One crossing seen: the frame shown (1-based), the line, the direction, the class when said. @typedef {{frame: number, screenline: string, direction: Way, class?: string}} Press */
/**
 * A hand count of frames `from_frame` to `to_frame` (inclusive, 1-based) of the lines named.
 * @typedef {{who: string, made: string, from_frame: number, to_frame: number, screenlines: string[], presses: Press[]}} Tally
 */
/** A correction factor as the person chose it: for the lines named (all when none). @typedef {{factor: number, screenlines?: string[], reason?: string}} Correction */
/** A key of a tally: the key's name, the line and direction it counts, the direction's label. @typedef {{key: string, screenline: string, direction: Way, label: string}} TallyKey */
/** A tally under way, with its keys. @typedef {{tally: Tally, keys: TallyKey[]}} TallyRun */

/**
 * The keys handed out, in order: the digits, then letters the page's other keys leave free
 * (N, P, A and R answer the review; Z undoes).
 */
export const KEYS = ["1", "2", "3", "4", "5", "6", "7", "8", "9", "0", "q", "w", "e", "t", "y", "u", "i", "o"];

/** The key that takes back the last press. */
export const UNDO_KEY = "Backspace";

/**
 * One key per line and direction, lines in the plan's order (forward first): as many as there
 * are keys; `missing` says how many line-directions got none.
 * @param {{screenlines: {name: string, forward?: string, backward?: string}[]}} plan
 * @param {string[]} names the lines to count
 * @returns {{keys: TallyKey[], missing: number}}
 */
export function tallyKeys(plan, names) {
  /** @type {TallyKey[]} */
  const keys = [];
  let missing = 0;
  for (const line of plan.screenlines) {
    if (!names.includes(line.name)) continue;
    for (const direction of /** @type {const} */ (["forward", "backward"])) {
      const key = KEYS[keys.length];
      if (key === undefined) missing++;
      else keys.push({ key, screenline: line.name, direction, label: line[direction] || direction });
    }
  }
  return { keys, missing };
}

/**
 * Seconds from a time typed as "m:ss", "m:ss.cc", "h:mm:ss" or plain seconds; null when it is
 * none of these.
 * @param {string} text
 */
export function parseTime(text) {
  const t = text.trim();
  if (/^\d+(\.\d+)?$/.test(t)) return Number(t);
  const m = t.match(/^(?:(\d+):)?(\d+):(\d{1,2}(?:\.\d+)?)$/);
  if (!m) return null;
  const [h, min, s] = [Number(m[1] || 0), Number(m[2]), Number(m[3])];
  if (s >= 60 || (m[1] !== undefined && min >= 60)) return null;
  return h * 3600 + min * 60 + s;
}

/**
 * The frame on screen at `seconds` (frame f shows from (f − 1)/fps to f/fps), within 1 and `last`.
 * @param {number} seconds
 * @param {number} fps
 * @param {number} last
 */
export function frameAt(seconds, fps, last) {
  return Math.max(1, Math.min(last, Math.floor(seconds * fps + 1e-6) + 1));
}

/**
 * The sample offered first: the whole footage when it lasts five minutes or less, else five
 * minutes from the frame shown (cut at the end). Frames, 1-based.
 * @param {number} frame the frame shown
 * @param {number} last the last frame
 * @param {number} fps
 */
export function defaultSample(frame, last, fps) {
  const five = Math.round(5 * 60 * fps);
  if (last <= five) return { from: 1, to: last };
  const from = Math.min(frame, last);
  return { from, to: Math.min(last, from + five - 1) };
}

/**
 * The page's clock now as the project file writes when a tally was made: local time,
 * `YYYY-MM-DDTHH:MM:SS`.
 * @param {Date} d
 */
export function localStamp(d) {
  const p = (/** @type {number} */ n) => String(n).padStart(2, "0");
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}:${p(d.getSeconds())}`;
}

/**
 * The presses of a tally for each key so far.
 * @param {TallyRun} run
 * @returns {Map<string, number>} by key
 */
export function runningCounts(run) {
  const out = new Map(run.keys.map((k) => [k.key, 0]));
  for (const p of run.tally.presses) {
    const k = run.keys.find((k) => k.screenline === p.screenline && k.direction === p.direction);
    if (k) out.set(k.key, (out.get(k.key) || 0) + 1);
  }
  return out;
}

/**
 * The tally key a keyboard key stands for (letters in either case), or undefined.
 * @param {TallyRun} run
 * @param {string} key KeyboardEvent.key
 */
export function keyFor(run, key) {
  const k = key.toLowerCase();
  return run.keys.find((t) => t.key === k);
}
