// Footage with frames missing (a camera or recorder that dropped them; footage of a variable frame
// rate): the page fills each gap as ffmpeg fills it when it makes a constant frame rate (FFmpeg,
// Debian's package, the reference), so frame numbers follow the footage's clock: the boxes the
// page finds equal `throughline detect --footage` on the same file byte for byte (its ffmpeg
// decoding, `-vsync cfr`), the clip keeps its 750 frames, and both say how many were filled.
// Before, the page numbered the frames it had one after another: every box after a 2-second gap
// came 2 seconds early against the picture and the count's clock.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, writeFileSync, mkdtempSync } from "node:fs";
import { execFileSync, spawnSync } from "node:child_process";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { useBrowser, openPage, showView, demo, targetDir, LAPTOP } from "./harness.mjs";

const env = useBrowser();
const cli = join(targetDir, "release/throughline");
const scratch = mkdtempSync(join(tmpdir(), "tl-gaps-"));

test("frames missing from footage are filled as ffmpeg fills them, and said", async () => {
  // The demo's frames 101–150 left out, the others keeping their times (VP9 in WebM).
  const gap = join(scratch, "dropped.webm");
  execFileSync("ffmpeg", ["-v", "error", "-y", "-i", demo("footage.webm"), "-vf", "select='not(between(n\\,100\\,149))'", "-fps_mode", "passthrough", "-c:v", "libvpx-vp9", "-deadline", "realtime", "-b:v", "1M", gap]);
  const settings = { far_height: 34, near_height: 91 };
  const config = join(scratch, "detector.json");
  writeFileSync(config, JSON.stringify(settings));
  const { page } = await openPage(env, { viewport: LAPTOP });
  await showView(page, "Set up");
  await page.getByLabel("Open footage").setInputFiles(gap);
  await page.waitForFunction(() => !document.getElementById("find-objects").disabled);
  await page.getByLabel("Height at top edge (px)").fill("34");
  await page.getByLabel("Height at bottom edge (px)").fill("91");
  await page.getByRole("button", { name: "Find moving objects" }).click();
  await page.waitForFunction(() => /^Found \d+ boxes of moving objects/.test(document.getElementById("find-status").textContent), null, { timeout: 600000 });
  assert.match(await page.locator("#find-status").innerText(), /over 750 frames/);
  assert.match(await page.locator("#messages").innerText(), /dropped\.webm: 50 frames missing from it were filled with the pictures either side/);

  await showView(page, "Results");
  const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "Export detections", exact: true }).click()]);
  const exported = join(scratch, "page-detections.csv");
  await download.saveAs(exported);
  const page_ = readFileSync(exported, "utf8");
  assert.match(page_, /^# footage_frames: 750\n/);
  const out = join(scratch, "cli-detections.csv");
  const cliRun = spawnSync(cli, ["detect", "--footage", gap, "--config", config, "-o", out, "-q"], { encoding: "utf8" });
  assert.equal(cliRun.status, 0, cliRun.stderr);
  assert.equal(page_, readFileSync(out, "utf8"), "the page's boxes equal throughline detect's on ffmpeg's constant-rate frames");
  assert.match(cliRun.stderr, /dropped\.webm: 50 frames missing from it were filled with the pictures either side/);
  // Counted and handed in: the grid says it, as the command line's does.
  await page.getByLabel("Open plan").setInputFiles(demo("plan.json"));
  await showView(page, "Set up");
  // Run is offered beside what Find found (on a phone Run is far above).
  await page.locator("#find-status").getByRole("button", { name: "Run now" }).click();
  await page.waitForFunction(() => /tracks in/.test(document.getElementById("run-status").textContent), null, { timeout: 60000 });
  await showView(page, "Results");
  await page.waitForFunction(() => /dropped\.webm: 50 frames missing from it were filled/.test(document.getElementById("grid-view").textContent));
  await page.close();
});
