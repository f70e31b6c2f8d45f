// Shared steps of the hand-count and hand-in scenarios (hand-count-*.test.mjs, handin-*.test.mjs):
// a tally made in the page with key presses, the simulator's true crossings of the demo it is
// checked against (demo-site/demo/truth_report.json, made by our own simulator from its truth
// tracks), and the command line's hand-in files for the same inputs (`throughline run --site …
// --start …`), which the page's downloads must equal byte for byte.
import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, readdirSync } from "node:fs";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { demo } from "./harness.mjs";
import { cli, DEMO, goToFrame } from "./review-helpers.mjs";

/** The site and start the scenarios hand in under (the demo plan's own start). */
export const SITE = "Footbridge plaza";
export const START = "2026-03-02T07:00:00";
export const STEM = "footbridge-plaza_2026-03-02";

/**
 * The simulator's true crossings of the demo's lines in frames `from` to `to` (inclusive):
 * `[{frame, name, direction, class}]`, from `truth_report.json` (the plan counted on the truth tracks).
 */
export function trueCrossings(from, to) {
  const truth = JSON.parse(readFileSync(demo("truth_report.json"), "utf8"));
  return truth.events.filter((e) => e.kind === "screenline" && e.frame >= from && e.frame <= to).map(({ frame, name, direction, class: cls }) => ({ frame, name, direction, class: cls }));
}

/**
 * Starts a hand count in Review, Hand count: the name, the sample typed as times, all lines.
 * @param {import("playwright-core").Page} page
 */
export async function startTally(page, who, from, to) {
  await page.getByRole("tab", { name: /^Hand count/ }).click();
  await page.getByLabel("Your name").fill(who);
  await page.getByLabel("From", { exact: true }).fill(from);
  await page.getByLabel("To", { exact: true }).fill(to);
  await page.getByRole("button", { name: "Start counting" }).click();
  await page.waitForSelector("#tally-live:not([hidden])");
}

/**
 * Goes to `frame` (as a person drags the scrub bar) and presses `key`, as a person does who sees a
 * crossing there.
 */
export async function pressAt(page, frame, key) {
  await goToFrame(page, frame);
  await page.keyboard.press(key);
}

/** The key the page gives a line and direction while a tally runs (its key buttons say so). */
export async function keyOf(page, line, label) {
  const name = new RegExp(`^${line}, ${label} \\(key (.)\\)$`);
  const label_ = await page.getByRole("button", { name }).getAttribute("aria-label");
  return label_.match(name)[1];
}

/**
 * `throughline run` on the demo's detections with the hand-in options: the files it writes next to
 * the report, by name. `more`: extra arguments (`--edits`, `--still`, `--footage`); `plan`: the
 * plan file (the demo's by default).
 */
export function cliHandin(more = [], plan = DEMO.plan) {
  const dir = mkdtempSync(join(tmpdir(), "tl-handin-"));
  execFileSync(cli, ["run", DEMO.detections, "--plan", plan, "--site", SITE, "--start", START, "-o", join(dir, "report.json"), "-q", ...more]);
  return Object.fromEntries(readdirSync(dir).map((f) => [f, readFileSync(join(dir, f), "utf8")]));
}

/** Names the site under Set up, Files, as a person types it. */
export async function nameSite(page, site) {
  await page.getByRole("tab", { name: "Set up" }).click();
  await page.getByLabel("Site name").fill(site);
  await page.getByLabel("Site name").press("Tab");
}
