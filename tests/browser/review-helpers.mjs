// Shared steps of the review and correction scenarios (review-*.test.mjs): what a person does in the
// page (choose a track, open a tab, export a file) and the outside reference every count is checked
// against, `throughline run --edits` on the same demo files (the command line replays an edits or
// project file through the same core; its own checks are in crate/cli/tests).
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { openPage, run, showView, downloadText, demo, root, targetDir, LAPTOP } from "./harness.mjs";

export const cli = join(targetDir, "release/throughline");
export const scratch = mkdtempSync(join(tmpdir(), "tl-review-"));

/** The demo's detections (with appearance vectors: tracked with the default method, as the page does) and plan. */
export const DEMO = { detections: demo("detections.csv"), plan: demo("plan.json") };

/**
 * `throughline run` on the demo with these corrections (an edits list, or a file's path): the
 * report's text, the reference the page's report must equal byte for byte.
 * @param {object[] | string} edits
 * @param {{plan?: string, csv?: string, method?: string}} [more]
 */
export function replay(edits, more = {}) {
  let file = edits;
  if (Array.isArray(edits)) {
    file = join(scratch, `edits-${Date.now()}-${Math.random().toString(36).slice(2)}.json`);
    writeFileSync(file, JSON.stringify({ format: "throughline-edits", version: 1, edits }));
  }
  const out = join(scratch, `cli-report-${Date.now()}.json`);
  const args = ["run", DEMO.detections, "--plan", more.plan || DEMO.plan, "--edits", file, "-o", out, "-q"];
  if (more.csv) args.push("--csv", more.csv);
  if (more.method) args.push("--method", more.method);
  execFileSync(cli, args);
  return readFileSync(out, "utf8");
}

/** A fresh page on a laptop's screen, the demo tracked and counted, showing Review. */
export async function reviewDemo(env) {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await run(page);
  await showView(page, "Review");
  return { page, seen };
}

/**
 * Opens one of the review's tabs: "To check", "Tracks", "Events", "Edits".
 * @param {import("playwright-core").Page} page
 * @param {string} name
 */
export async function openTab(page, name) {
  await page.getByRole("tab", { name: new RegExp(`^${name}`) }).click();
}

/** Chooses track `id` in the Tracks list, as a person clicks its row. */
export async function chooseTrack(page, id) {
  await openTab(page, "Tracks");
  await page.locator("#track-list button", { hasText: new RegExp(`^track ${id}(?!\\d)`) }).click();
  await page.waitForFunction((want) => new RegExp(`track ${want}\\b`).test(document.getElementById("focus-strip").textContent), id);
}

/**
 * Shows frame `f`, as a person drags the scrub bar there, and waits for the clock to say so.
 * @param {import("playwright-core").Page} page
 * @param {number} f
 */
export async function goToFrame(page, f) {
  await page.locator("#scrub").fill(String(f));
  await page.waitForFunction((want) => document.getElementById("clock").textContent.startsWith(`frame ${want} `), f);
}

/**
 * Waits until the counts on screen are those made with exactly `n` corrections (the Edits list says
 * so once the core's report lists what became of each of them).
 */
/**
 * Deletes a track from the Tracks list, as a person would, and waits for the count of one
 * correction.
 * @param {import("playwright-core").Page} page
 * @param {number} id
 */
export async function deleteTrack(page, id) {
  await chooseTrack(page, id);
  await page.locator("#tracks-correct").getByRole("button", { name: "Delete this track (Tracks list)" }).click();
  await page.locator("#tracks-correct").getByRole("button", { name: "Delete track", exact: true }).click();
  await countedWith(page, 1);
}

export async function countedWith(page, n) {
  await page.waitForSelector(`#edit-list[data-counted="${n}"]`, { state: "attached", timeout: 20000 });
}

/** The report the page exports (Results, Export report), as text. */
export async function pageReport(page) {
  await showView(page, "Results");
  const text = await downloadText(page, "Export report", scratch);
  await showView(page, "Review");
  return text;
}

/** The edits file the page exports (Review, Edits, Export edits), as text. */
export async function pageEdits(page) {
  await openTab(page, "Edits");
  return downloadText(page, "Export edits", scratch);
}

/**
 * The totals the page shows under Results, per line: {name: {forward, backward}}.
 * @param {import("playwright-core").Page} page
 */
export async function screenTotals(page) {
  const rows = await page.locator("#summary table tbody tr").evaluateAll((trs) => trs.map((tr) => [...tr.cells].map((c) => c.textContent)));
  return Object.fromEntries(rows.map((r) => [r[0], { forward: Number(r[1].split(": ").pop()), backward: Number(r[2].split(": ").pop()) }]));
}

/** Totals per line of a report: {name: {forward, backward}}. */
export function reportTotals(reportText) {
  const report = JSON.parse(reportText);
  return Object.fromEntries(report.screenlines.map((l) => [l.name, { forward: l.forward, backward: l.backward }]));
}

/**
 * The report of the demo with no corrections (the command line's), parsed.
 * @param {string} [method] a method other than the default
 * @param {string} [plan] a plan other than the demo's
 */
export function uncorrected(method, plan) {
  return JSON.parse(replay([], { method, plan }));
}

/**
 * Chooses the tracking method under Set up, as a person picks it from the list before Run.
 * @param {import("playwright-core").Page} page
 * @param {string} method
 */
export async function chooseMethod(page, method) {
  await showView(page, "Set up");
  await page.getByLabel("Method").selectOption(method);
}

/**
 * The demo's plan counted on the boxes as the tracker gave them, with the margin used before paths
 * were averaged (`"rules": {"hysteresis": 0.15, "smooth_seconds": 0}`): with SORT it counts one
 * walker twice on the divide (westbound, frame 500, tracks 20 and 25), a known mistake for the
 * walk-throughs of a correction to find. With the default rules every motion method counts the
 * demo as its truth.
 */
export const PLAN_AS_GIVEN = join(root, "tests/fixtures/demo-plan-boxes-as-given.json");

/**
 * Counts the demo with SORT on the boxes as given (see {@link PLAN_AS_GIVEN}): chooses the method
 * and opens the plan file under Set up, as a person would.
 * @param {import("playwright-core").Page} page
 */
export async function withTheKnownDoubleCount(page) {
  await chooseMethod(page, "sort");
  await page.setInputFiles("#open-plan", PLAN_AS_GIVEN);
  await page.waitForFunction(() => document.getElementById("plan-name").textContent.includes("demo-plan-boxes-as-given.json"));
}
