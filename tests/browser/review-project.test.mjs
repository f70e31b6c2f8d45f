// A project file opened again: on the same demo files, in a page with nothing kept, it brings back
// the plan, the corrections and the decisions, and after Run the counts are those of its
// corrections (`throughline run --edits project.json`, byte for byte), with no warning. Opened
// against other footage (the demo re-encoded by ffmpeg: another file) it says so, naming the file.
import { test } from "node:test";
import assert from "node:assert/strict";
import { writeFileSync } from "node:fs";
import { execFileSync } from "node:child_process";
import { join } from "node:path";
import { useBrowser, showView, run, downloadText, demo, screenshot } from "./harness.mjs";
import { reviewDemo, chooseTrack, countedWith, pageReport, replay, scratch } from "./review-helpers.mjs";

const env = useBrowser();

test("a project reopens on the same files; against other footage it warns", async () => {
  const { page, seen } = await reviewDemo(env);
  await chooseTrack(page, 19);
  await page.locator("#tracks-correct").getByRole("button", { name: "Delete this track (Tracks list)" }).click();
  await page.locator("#tracks-correct").getByRole("button", { name: "Delete track", exact: true }).click();
  await countedWith(page, 1);
  await showView(page, "Set up");
  const projectPath = join(scratch, "saved-project.json");
  writeFileSync(projectPath, await downloadText(page, "Save project", scratch));

  // Nothing kept, the demo's files: the project brings the work back, with no warning.
  await page.evaluate(() => localStorage.clear());
  await page.reload();
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  await page.getByLabel("Open project").setInputFiles(projectPath);
  await page.waitForFunction(() => /saved-project\.json opened: its plan, 1 correction and 0 review decisions/.test(document.getElementById("messages").textContent));
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
