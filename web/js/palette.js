// @ts-check
// The page's colours, each with one meaning (DEVELOPERS.md, "Visual language"). Marks over the
// footage are coloured by what they say (a direction, a state), never by a track's number; lines and
// zones have a key colour that belongs to the item itself, kept by name, so adding or deleting
// another item never recolours it. The colours are from the Okabe–Ito palette (Okabe and Ito,
// "Color Universal Design", 2002), chosen to stay apart for the common kinds of colour blindness.

/** Direction of a crossing: forward is the side the gate's teeth point to. */
export const DIRECTION_COLOUR = { forward: "#E69F00", backward: "#0072B2" };

/** The state of a track's marks at the frame shown. */
export const STATE_COLOUR = {
  /** seen: a detection was matched in this frame */
  seen: "#FFFFFF",
  /** hidden: no detection; the position is the tracker's prediction */
  hidden: "#56B4E9",
  /** doubtful: a moment listed for review (reserved for the doubtful-moments queue) */
  doubtful: "#F0E442",
};

/** Plan marks (gates, posts, ground points) are drawn in white over a dark casing. */
export const PLAN_INK = "#FFFFFF";
/** The dark edge under every mark, so it reads on light and dark footage alike. */
export const CASING = "rgba(10, 12, 18, 0.82)";
/** The ground of a label over the footage. */
export const TAG_GROUND = "rgba(10, 12, 18, 0.84)";

/** Key colours of lines and zones, in the order they are handed out. */
export const KEY_COLOURS = ["#CC79A7", "#009E73", "#A99BE0", "#9CCB6B", "#F0E442", "#D55E00", "#56B4E9"];

const STORAGE_KEY = "throughline.colours.v1";

/** Which key colour each line or zone has, by name, kept in the browser's storage. */
export class KeyColours {
  /** @param {Storage} storage */
  constructor(storage) {
    this.storage = storage;
    /** @type {Map<string, number>} name -> index in KEY_COLOURS */
    this.given = new Map();
    try {
      const saved = JSON.parse(storage.getItem(STORAGE_KEY) || "{}");
      for (const [name, i] of Object.entries(saved)) if (Number.isInteger(i)) this.given.set(name, Number(i));
    } catch (e) {
      // Unreadable storage: colours are handed out afresh.
    }
  }

  /**
   * The colour of the item called `name`; a name seen for the first time takes the first colour
   * no other current item has.
   * @param {string} name
   * @param {string[]} current the names of all lines and zones now in the plan
   */
  colour(name, current) {
    let i = this.given.get(name);
    if (i === undefined) {
      const used = new Set(current.filter((n) => n !== name).map((n) => this.given.get(n)));
      i = KEY_COLOURS.findIndex((_, k) => !used.has(k));
      if (i < 0) i = this.given.size % KEY_COLOURS.length;
      this.given.set(name, i);
      this.save();
    }
    return KEY_COLOURS[i % KEY_COLOURS.length];
  }

  /**
   * Follows renames: where the plan before and after an edit list the same number of lines (or
   * zones) and one name changed, the new name keeps the old one's colour.
   * @param {import("./plan.js").Plan} before
   * @param {import("./plan.js").Plan} after
   */
  follow(before, after) {
    for (const key of /** @type {const} */ (["screenlines", "zones"])) {
      const a = before[key];
      const b = after[key];
      if (a.length !== b.length) continue;
      a.forEach((item, i) => {
        const was = this.given.get(item.name);
        if (item.name !== b[i].name && was !== undefined && !this.given.has(b[i].name)) {
          this.given.set(b[i].name, was);
          this.save();
        }
      });
    }
  }

  save() {
    try {
      this.storage.setItem(STORAGE_KEY, JSON.stringify(Object.fromEntries(this.given)));
    } catch (e) {
      // Storage full or disabled: colours still hold for this visit.
    }
  }
}

/**
 * The names of every line and zone in the plan.
 * @param {import("./plan.js").Plan} plan
 */
export function itemNames(plan) {
  return [...plan.screenlines, ...plan.zones].map((x) => x.name);
}
