// What the page saves replays on the command line. One correction of each kind made in the page
// (from the strip under the footage this time), a decision on a doubtful moment, a site name; then
// the exported edits file given to `throughline run --edits` gives the page's exported report and
// counts CSV byte for byte, and so does the saved project file (its own plan, its edits). The
// project's fingerprints of the footage and detections are checked against Node's own SHA-256 of
// the files' first MiB (node:crypto), its sizes against the files'.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, writeFileSync, statSync } from "node:fs";
import { createHash } from "node:crypto";
import { join } from "node:path";
import { useBrowser, showView, downloadText, demo } from "./harness.mjs";
import { reviewDemo, chooseTrack, openTab, goToFrame, countedWith, pageReport, pageEdits, replay, scratch, DEMO } from "./review-helpers.mjs";

const env = useBrowser();

/** Opens one of the strip's correction forms for the track in focus, fills it, submits it. */
async function correct(page, button, fill, submit, n) {
  const strip = page.locator("#focus-track-actions");
  await strip.getByRole("button", { name: button, exact: true }).click();
  if (fill) await fill(strip);
  await strip.getByRole("button", { name: submit, exact: true }).click();
  await countedWith(page, n);
}

/** SHA-256 of the first MiB of a file, hex: what a fingerprint's head_sha256 must be. */
function headSha(path) {
  return createHash("sha256").update(readFileSync(path).subarray(0, 1 << 20)).digest("hex");
}

test("exported edits and a saved project replay with throughline run --edits, byte for byte", async () => {
  const { page, seen } = await reviewDemo(env);
  await chooseTrack(page, 21);
  await correct(page, "Merge with another track", (f) => f.getByLabel("Track to merge with").selectOption("27"), "Merge", 1);
  await chooseTrack(page, 23);
  await goToFrame(page, 663);
  await correct(page, "Split here, at this frame", null, "Split", 2);
  await chooseTrack(page, 19);
  await correct(page, "Delete this track", (f) => f.getByLabel("Reason (optional)").fill("reflection"), "Delete track", 3);
  await chooseTrack(page, 12);
  await correct(page, "Change class", (f) => f.getByLabel("New class").fill("scooter"), "Set class", 4);
  await openTab(page, "To check");
  await page.locator("#clock").click();
  await page.keyboard.press("n");
  await page.keyboard.press("r");
  await page.getByLabel("Why it is wrong").press("Enter");
  await countedWith(page, 5);
  await page.keyboard.press("n");
  await page.keyboard.press("a");
  await page.getByRole("button", { name: "Show all tracks" }).click();
  await openTab(page, "Events");
  await goToFrame(page, 455);
  await page.getByText("Add a crossing the tool missed").click();
  await page.getByLabel("Direction", { exact: true }).selectOption("backward");
  await page.getByRole("button", { name: "Add crossing" }).click();
  await countedWith(page, 6);
  const applied = await page.locator("#edit-list .status").allInnerTexts();
  assert.equal(applied.filter((s) => s.startsWith("applied:")).length, 6, applied.join("\n"));

  // The edits file.
  const editsPath = join(scratch, "page-edits.json");
  writeFileSync(editsPath, await pageEdits(page));
  const edits = JSON.parse(readFileSync(editsPath, "utf8"));
  assert.equal(edits.format, "throughline-edits");
  assert.deepEqual(edits.edits.map((e) => e.edit), ["merge_tracks", "split_track", "delete_track", "set_class", "reject_crossing", "add_crossing"]);
  const report = await pageReport(page);
  await showView(page, "Results");
  const csv = await downloadText(page, "Export counts CSV", scratch);
  const cliCsv = join(scratch, "cli-counts.csv");
  assert.equal(replay(editsPath, { csv: cliCsv }), report, "report: throughline run --edits edits.json");
  assert.equal(readFileSync(cliCsv, "utf8"), csv, "counts CSV: throughline run --edits edits.json");

  // The project file.
  await showView(page, "Set up");
  await page.getByLabel("Site name").fill("Footbridge plaza");
  await page.getByLabel("Site name").press("Enter");
  const projectText = await downloadText(page, "Save project", scratch);
  const projectPath = join(scratch, "Footbridge-plaza-project.json");
  assert.ok(statSync(projectPath).size > 0, "named after the site");
  const project = JSON.parse(projectText);
  assert.equal(project.format, "throughline-project");
  assert.equal(project.site, "Footbridge plaza");
  assert.deepEqual(project.edits, edits.edits);
  assert.equal(project.review.length, 2);
  assert.deepEqual(project.review.map((r) => r.decision), ["rejected", "accepted"]);
  assert.equal(project.footage.size, statSync(demo("footage.webm")).size);
  assert.equal(project.footage.head_sha256, headSha(demo("footage.webm")));
  assert.ok(Math.abs(project.footage.duration_seconds - 30) < 0.1, `${project.footage.duration_seconds} s`);
  assert.equal(project.detections.head_sha256, headSha(DEMO.detections));
  const planPath = join(scratch, "project-plan.json");
  writeFileSync(planPath, JSON.stringify(project.plan));
  assert.equal(replay(projectPath, { plan: planPath }), report, "report: throughline run --plan (the project's) --edits project.json");
  assert.deepEqual(seen.errors, []);
  await page.close();
});
