// A project file opened again: on the same demo files, in a page with nothing kept, it brings back
// the plan, the corrections and the decisions, and after Run the counts are those of its
// corrections (`throughline run --edits project.json`, byte for byte), with no warning. Opened
// against other footage (the demo re-encoded by ffmpeg: another file) it says so, naming the file.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, writeFileSync } from "node:fs";
import { execFileSync } from "node:child_process";
import { join } from "node:path";
import { useBrowser, showView, run, downloadText, demo, screenshot } from "./harness.mjs";
import { reviewDemo, countedWith, pageReport, replay, scratch, openTab, deleteTrack } from "./review-helpers.mjs";

const env = useBrowser();

test("a project reopens on the same files; against other footage it warns", async () => {
  const { page, seen } = await reviewDemo(env);
  await deleteTrack(page, 19);
  await showView(page, "Set up");
  // The detector's two heights go with the project (a newcomer's trial: they were in no file).
  await page.getByLabel("Height at top edge (px)").fill("34");
  await page.getByLabel("Height at top edge (px)").press("Tab");
  await page.getByLabel("Height at bottom edge (px)").fill("91");
  await page.getByLabel("Height at bottom edge (px)").press("Tab");
  const projectPath = join(scratch, "saved-project.json");
  writeFileSync(projectPath, await downloadText(page, "Save project", scratch));
  assert.deepEqual(JSON.parse(readFileSync(projectPath, "utf8")).detector, { far_height: 34, near_height: 91 });

  // Nothing kept, the demo's files: the project brings the work back, with no warning.
  await page.evaluate(() => localStorage.clear());
  await page.reload();
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  await page.getByLabel("Open project").setInputFiles(projectPath);
  await page.waitForFunction(() => /saved-project\.json opened: its plan, 1 correction and 0 review decisions/.test(document.getElementById("messages").textContent));
  assert.deepEqual([await page.getByLabel("Height at top edge (px)").inputValue(), await page.getByLabel("Height at bottom edge (px)").inputValue()], ["34", "91"]);
  await run(page);
  await countedWith(page, 1);
  await showView(page, "Review");
  assert.equal(await pageReport(page), replay(projectPath), "the counts of the project's corrections");
  assert.equal(await page.locator(".message[data-key=project-files]").count(), 0, "the same files: no warning");

  // Other footage: the same scene re-encoded is another file, and the page says which.
  const other = join(scratch, "plaza-again.webm");
  execFileSync("ffmpeg", ["-v", "error", "-y", "-i", demo("footage.webm"), "-frames:v", "120", "-c:v", "libvpx-vp9", "-b:v", "300k", "-an", other]);
  await showView(page, "Set up");
  await page.getByLabel("Open footage").setInputFiles(other);
  await page.getByLabel("Open project").setInputFiles(projectPath);
  const warning = page.locator(".message[data-key=project-files]");
  await warning.waitFor();
  assert.match(await warning.innerText(), /This work was made with other files\. plaza-again\.webm is not the file this work was made with \(footage\.webm, \d+ bytes\)\./);
  await screenshot(page, "15-project-other-footage", { fullPage: false });
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("a project saved before paths were averaged says how to count as it did", async () => {
  const { page, seen } = await reviewDemo(env);
  await showView(page, "Set up");
  const saved = JSON.parse(await downloadText(page, "Save project", scratch));
  const older = join(scratch, "older-project.json");
  writeFileSync(older, JSON.stringify({ ...saved, generator: "throughline 0.1.0" }));
  await page.getByLabel("Open project").setInputFiles(older);
  const note = page.locator(".message[data-key=project-rules]");
  await note.waitFor();
  assert.match(await note.innerText(), /older-project\.json was saved by throughline 0\.1\.0, .*set Crossing margin to 0\.15 and Path averaging to 0 under Set up\./s);
  // Saved again by this version, it opens with no such note.
  const again = join(scratch, "saved-again.json");
  writeFileSync(again, await downloadText(page, "Save project", scratch));
  await page.getByLabel("Open project").setInputFiles(again);
  await page.waitForFunction(() => /saved-again\.json opened/.test(document.getElementById("messages").textContent));
  assert.equal(await note.count(), 0);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("a project tracked before DeepSORT kept low-score boxes is tracked as it was, and its merge applies", async () => {
  const { page, seen } = await reviewDemo(env);
  await showView(page, "Set up");
  const saved = JSON.parse(await downloadText(page, "Save project", scratch));
  // 0.2.0's DeepSORT ended track 17 at frame 378; the person merged 21 into it then.
  const merge = { edit: "merge_tracks", track: { id: 21, frames: [382, 624] }, into: { id: 17, frames: [244, 378] }, reason: "one cyclist" };
  const older = join(scratch, "tracked-older.json");
  writeFileSync(older, JSON.stringify({ ...saved, generator: "throughline 0.2.0", tracking: {}, edits: [merge] }));
  await page.getByLabel("Open project").setInputFiles(older);
  const note = page.locator(".message[data-key=project-tracking]");
  await note.waitFor();
  assert.match(await note.innerText(), /tracked-older\.json was tracked by throughline 0\.2\.0, .*it is tracked the same way here/s);
  await page.getByRole("button", { name: "Run", exact: true }).click();
  await countedWith(page, 1);
  // The same as the command line replaying that project (it tracks it as it was too).
  const want = replay(older);
  assert.equal(await pageReport(page), want);
  assert.equal(JSON.parse(want).edits[0].applied, true);
  // Saved again, the project carries those settings, and the command line gives the same report.
  const again = join(scratch, "tracked-again.json");
  await showView(page, "Set up");
  const text = await downloadText(page, "Save project", scratch);
  assert.deepEqual(JSON.parse(text).tracking, { settings: { min_score: 0.3, start_score: 0 } });
  writeFileSync(again, text);
  assert.equal(replay(again), want);
  // With settings of its own, the older defaults go under them, as on the command line.
  const own = join(scratch, "tracked-own.json");
  writeFileSync(own, JSON.stringify({ ...saved, generator: "throughline 0.2.0", tracking: { settings: { max_age: 5 } }, edits: [] }));
  await page.getByLabel("Open project").setInputFiles(own);
  await page.waitForFunction(() => /tracked-own\.json was tracked by/.test(document.getElementById("messages").textContent));
  await page.getByRole("button", { name: "Run", exact: true }).click();
  await countedWith(page, 0);
  const ownReport = await pageReport(page);
  assert.equal(ownReport, replay(own));
  const { max_age, min_score, start_score } = JSON.parse(ownReport).tracker;
  assert.deepEqual({ max_age, min_score, start_score }, { max_age: 5, min_score: 0.3, start_score: 0 });
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("Clear work begins afresh: corrections, decisions and the site's name go, Undo brings them back", async () => {
  const { page, seen } = await reviewDemo(env);
  await deleteTrack(page, 19);
  await showView(page, "Set up");
  await page.getByLabel("Site name").fill("Harbour steps");
  await page.getByLabel("Site name").press("Enter");
  // Asked first (a newcomer's trial: there was no way to begin afresh on other files).
  const asked = [];
  page.once("dialog", (d) => { asked.push(d.message()); d.accept(); });
  await page.getByRole("button", { name: "Clear work…" }).click();
  await page.waitForFunction(() => /Work cleared/.test(document.getElementById("messages").textContent));
  assert.match(asked[0] || "", /Clear the corrections, decisions, hand counts and site name/);
  assert.equal(await page.getByLabel("Site name").inputValue(), "");
  await countedWith(page, 0);
  const kept = await page.evaluate(() => JSON.parse(localStorage.getItem("throughline.review.v1") || "{}"));
  assert.deepEqual([kept.edits, kept.site], [[], ""], "what is kept in the browser is cleared too");
  // Undo under Review brings the corrections back, and the site's name (nothing the person made is lost).
  await showView(page, "Review");
  await openTab(page, "Edits");
  await page.getByRole("button", { name: "Undo last change" }).click();
  await countedWith(page, 1);
  assert.equal(await page.locator(".message[data-key=work-cleared]").count(), 0, "the note goes once the work is back");
  assert.equal(await page.getByLabel("Site name").inputValue(), "Harbour steps");
  const back = await page.evaluate(() => JSON.parse(localStorage.getItem("throughline.review.v1") || "{}"));
  assert.deepEqual([back.edits.length, back.site], [1, "Harbour steps"], "and kept in the browser again");
  // Redo clears it all again; the note's own Undo brings it back too.
  await page.getByRole("button", { name: "Redo last change" }).click();
  await countedWith(page, 0);
  assert.equal(await page.getByLabel("Site name").inputValue(), "");
  await page.getByRole("button", { name: "Undo last change" }).click();
  await countedWith(page, 1);
  await showView(page, "Set up");
  page.once("dialog", (d) => d.accept());
  await page.getByRole("button", { name: "Clear work…" }).click();
  await page.locator(".message[data-key=work-cleared]").getByRole("button", { name: "Undo" }).click();
  await countedWith(page, 1);
  assert.equal(await page.getByLabel("Site name").inputValue(), "Harbour steps");
  assert.deepEqual(seen.errors, []);
  await page.close();
});
