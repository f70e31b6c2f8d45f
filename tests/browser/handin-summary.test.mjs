// The client summary: made in the page after a hand count, with a still of the frame shown. It
// shows the site, the still with the lines drawn over it, the totals of the report and how the
// count was checked; printed (print media), it is the only thing on the page. The still is that
// frame of the footage (compared with Debian's ffmpeg decoding of the same frame: a mean
// difference under 12 of 255 for JPEG and two decoders' colour conversions, and nearer it than to
// the frame two seconds later). Downloaded, it is byte for byte what `throughline run --site …
// --start … --still` writes from the project the page saves and that still.
import { test } from "node:test";
import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { useBrowser, openPage, run, showView, downloadText, screenshot, demo, LAPTOP, PHONE } from "./harness.mjs";
import { goToFrame, scratch, uncorrected } from "./review-helpers.mjs";
import { trueCrossings, startTally, pressAt, keyOf, nameSite, cliHandin, SITE, STEM } from "./handin-helpers.mjs";

const env = useBrowser();
const STILL_FRAME = 110;

/** Frame `f` (1-based) of the demo footage, or a JPEG file, as RGB bytes at 640 × 360 (ffmpeg). */
function ffmpegRgb(input, f = 1) {
  return execFileSync("ffmpeg", ["-v", "error", "-i", input, "-vf", `select=eq(n\\,${f - 1})`, "-frames:v", "1", "-f", "rawvideo", "-pix_fmt", "rgb24", "-"], { maxBuffer: 1 << 24 });
}

/** Mean absolute difference of two RGB pictures (0 to 255). */
function meanDiff(a, b) {
  let sum = 0;
  for (let i = 0; i < a.length; i++) sum += Math.abs(a[i] - b[i]);
  return sum / a.length;
}

test("the client summary prints with the still and the numbers, and equals the command line's", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await nameSite(page, SITE);
  await run(page);
  await showView(page, "Review");
  await startTally(page, "Ana", "0:15", "0:30");
  for (const c of trueCrossings(376, 750)) {
    const label = { "plaza midline": { forward: "towards camera", backward: "towards bridge" }, "east-west divide": { forward: "westbound", backward: "eastbound" } }[c.name][c.direction];
    await pressAt(page, c.frame, await keyOf(page, c.name, label));
  }
  await page.getByRole("button", { name: "Finish and compare" }).click();
  await page.waitForSelector(".tally-check tbody tr");
  await goToFrame(page, STILL_FRAME);

  await showView(page, "Results");
  await page.waitForFunction(() => /Footbridge plaza/.test(document.getElementById("grid-view")?.textContent || ""));
  await page.getByRole("button", { name: "Make summary" }).click();
  const summary = page.locator("#client-summary");
  await summary.waitFor();
  assert.equal(await summary.getAttribute("data-frame"), String(STILL_FRAME));
  assert.equal(await summary.locator("h1").innerText(), `Counts at ${SITE}`);
  const still = await summary.locator("svg image").getAttribute("href");
  assert.match(still, /^data:image\/jpeg;base64,/);
  // The totals are the report's (the command line's report of the same files).
  const totals = await summary.locator("table").first().locator("tr").evaluateAll((trs) => trs.slice(1).map((tr) => [...tr.cells].map((c) => c.textContent)));
  for (const l of uncorrected().screenlines) {
    const row = totals.find((r) => r[0] === l.name);
    assert.deepEqual([row[1], row[2], row[3]], [`${l.forward} ${l.forward_label}`, `${l.backward} ${l.backward_label}`, String(l.forward + l.backward)]);
  }
  assert.match(await summary.innerText(), /Counted by hand by Ana/);
  // It names the project file as what reproduces the counts, and none is saved yet: the page says
  // so beside the summary, in the hand-in and beside Save project (a newcomer's trial).
  const projectFile = "Footbridge-plaza-project.json";
  assert.match(await page.locator("#summary-status").innerText(), new RegExp(`It names ${projectFile} as what reproduces the counts: save the project`));
  assert.match(await page.locator("#handin-missing").innerText(), /save the project \(Set up, Files, Save project\)/);
  assert.equal(await page.locator("#project-saved").textContent(), "not saved yet");

  // The still is that frame of the footage.
  const dir = mkdtempSync(join(tmpdir(), "tl-summary-"));
  const stillPath = join(dir, "still.jpg");
  writeFileSync(stillPath, Buffer.from(still.split(",")[1], "base64"));
  const rgb = ffmpegRgb(stillPath);
  assert.equal(rgb.length, 640 * 360 * 3, "the still is the picture's size");
  const same = meanDiff(rgb, ffmpegRgb(demo("footage.webm"), STILL_FRAME));
  const later = meanDiff(rgb, ffmpegRgb(demo("footage.webm"), STILL_FRAME + 50));
  assert.ok(same < 12 && same < later, `still vs its frame ${same.toFixed(1)}, vs 2 s later ${later.toFixed(1)}`);

  // Printed, the summary is the page: the still and the numbers, nothing else.
  await page.evaluate(() => { window.print = () => { document.body.dataset.printed = "yes"; }; });
  await page.getByRole("button", { name: "Print summary" }).click();
  assert.deepEqual(await page.evaluate(() => [document.body.dataset.print, document.body.dataset.printed]), ["summary", "yes"]);
  await page.emulateMedia({ media: "print" });
  for (const hidden of ["#results", ".stage-column", "#handin", ".workspace-head", "#summary-card .button-row"]) {
    assert.equal(await page.locator(hidden).first().isVisible(), false, `${hidden} is not printed`);
  }
  assert.ok(await summary.locator("svg image").isVisible(), "the still is printed");
  const box = await summary.locator("svg").first().boundingBox();
  assert.ok(box.width > 500 && box.height > 250, `the still is printed ${box.width} × ${box.height}`);
  await screenshot(page, "16-summary-printed");
  await page.emulateMedia({ media: "screen" });
  await page.evaluate(() => { delete document.body.dataset.print; });

  // Downloaded: what the command line writes from the project saved here and that still.
  const html = await downloadText(page, "Download summary", scratch);
  await showView(page, "Set up");
  const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "Save project", exact: true }).click()]);
  const projectPath = join(dir, download.suggestedFilename());
  await download.saveAs(projectPath);
  const cli = cliHandin(["--edits", projectPath, "--still", stillPath]);
  assert.equal(html, cli[`${STEM}_summary.html`], "the summary = throughline run --site --start --still --edits project.json");
  assert.equal(download.suggestedFilename(), projectFile);
  await page.waitForFunction(() => document.getElementById("project-saved").textContent === "saved");
  assert.doesNotMatch(await page.locator("#handin-missing").textContent(), /save the project/);
  // A decision made after saving: the file no longer holds the work as it is.
  await showView(page, "Review");
  await page.locator("#clock").click();
  await page.keyboard.press("n");
  await page.keyboard.press("a");
  await page.waitForFunction(() => document.getElementById("project-saved").textContent === "changed since saved");

  await showView(page, "Results");
  await page.setViewportSize(PHONE);
  const [scroll, width] = await page.evaluate(() => [document.documentElement.scrollWidth, innerWidth]);
  assert.ok(scroll <= width, `summary on a phone: page ${scroll} px wide in a ${width} px window`);
  await summary.scrollIntoViewIfNeeded();
  await screenshot(page, "16-summary-phone", { fullPage: false });
  await page.setViewportSize(LAPTOP);
  await summary.scrollIntoViewIfNeeded();
  await screenshot(page, "16-summary-laptop", { fullPage: false });
  assert.deepEqual(seen.errors, []);
  await page.close();
});
