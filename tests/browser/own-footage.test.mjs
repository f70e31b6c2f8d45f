// A person's own footage opened over the bundled demo: the demo's detections and plan cannot be
// theirs (other boxes; lines, a start time and a frame rate for another scene, which a hand-in
// would carry), so they are set aside with a message saying what to do next, and Undo brings the
// plan back. The footage's length follows the plan's frame rate when the person corrects it (the
// seek bar and a hand count's sample reached 2.5 times past the end of 10 fps footage at 25).
// The footage is the demo's first 8 seconds made over at 10 frames a second by Debian's ffmpeg.
import { test } from "node:test";
import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { join } from "node:path";
import { useBrowser, openPage, showView, run, clickPicture, demo, LAPTOP } from "./harness.mjs";
import { scratch } from "./review-helpers.mjs";

const env = useBrowser();

test("own footage over the demo sets the demo's detections and plan aside; its length follows the frame rate", async () => {
  const street = join(scratch, "street.webm");
  execFileSync("ffmpeg", ["-v", "error", "-y", "-i", demo("footage.webm"), "-t", "8", "-vf", "scale=480:270,fps=10", "-c:v", "libvpx-vp9", "-b:v", "300k", street]);
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await page.waitForFunction(() => /demo detections\.csv/.test(document.getElementById("detections-name").textContent));
  assert.ok(await page.locator("#line-list li:not(.hint)").count() > 0, "the demo's lines");
  await run(page);
  await showView(page, "Set up");

  await page.getByLabel("Open footage").setInputFiles(street);
  await page.waitForFunction(() => document.getElementById("detections-name").textContent === "none");
  assert.equal(await page.locator("#line-list li:not(.hint)").count(), 0, "no lines of the demo's");
  assert.equal(await page.locator("#plan-name").innerText(), "drawn here");
  // The empty lists say how to draw (the Zones list said nothing: a newcomer's trial).
  assert.match(await page.locator("#zone-list .hint").innerText(), /^No zones yet: press Draw zone/);
  assert.match(await page.locator("#line-list .hint").innerText(), /^No lines yet/);
  const said = await page.locator(".message").allInnerTexts();
  assert.ok(said.some((m) => /street\.webm is open, and the demo's detections and plan .* set aside/.test(m) && /Find moving objects/.test(m) && /Undo \(Ctrl\+Z\)/.test(m)), said.join("\n"));
  assert.ok(!said.some((m) => /This is the bundled demo/.test(m)), "the demo's invitation is gone");
  // Counted before it, the demo's counts are gone too (not counted again on the new plan).
  await page.waitForTimeout(500);
  assert.equal(await page.evaluate(() => document.getElementById("results").hidden), true, "no counts shown");
  await page.getByRole("button", { name: "Run", exact: true }).click();
  await page.waitForFunction(() => [...document.querySelectorAll(".message")].some((m) => /Open a detections file first/.test(m.textContent)));
  // Undo brings the demo's plan back (not its detections: open them again to use them); the
  // footage opened again sets it aside again.
  await page.evaluate(() => /** @type {HTMLElement} */ (document.activeElement).blur());
  await page.keyboard.press("Control+z");
  await page.waitForFunction(() => document.querySelectorAll("#line-list li:not(.hint)").length === 2);
  assert.equal(await page.locator("#plan-name").innerText(), "demo plan.json", "the plan's name comes back with it");
  await page.getByLabel("Open footage").setInputFiles(join(scratch, "street.webm"));
  await page.waitForFunction(() => document.querySelectorAll("#line-list li:not(.hint)").length === 0);

  // 8 s of footage: 200 frames at the plan's 25, 80 once the frame rate is corrected to 10.
  await page.waitForFunction(() => document.getElementById("scrub").max === "200");
  await page.locator("#scrub").evaluate((s) => { s.value = "101"; s.dispatchEvent(new Event("input")); });
  await page.waitForFunction(() => /^frame 101 · 0:04\.00/.test(document.getElementById("clock").textContent));
  // The footage's own rate is read from its first frames when it opens, without playing it, and
  // offered (a newcomer's re-trial: 25 stood until the footage played).
  await page.waitForFunction(() => /is coded at about 10\.00 fps, not 25/.test(document.getElementById("fps-hint").textContent));
  await page.getByRole("button", { name: "Use 10.00" }).click();
  await page.waitForFunction(() => document.getElementById("scrub").max === "80");
  await page.waitForFunction(() => /is coded at 10\.00 fps, as set/.test(document.getElementById("fps-hint").textContent));
  // The same picture, at 4.02 s: frame 41 at 10 a second (it said frame 101 at 10.00 s).
  await page.waitForFunction(() => /^frame 41 · 0:04\.00/.test(document.getElementById("clock").textContent));

  // One line drawn and counted: no "movements" from the line to itself (a newcomer's trial).
  await page.getByLabel("Open detections").setInputFiles(demo("detections.csv"));
  await page.waitForFunction(() => /^detections\.csv/.test(document.getElementById("detections-name").textContent));
  await page.getByRole("button", { name: "Draw line" }).click();
  await clickPicture(page, 10, 150);
  await clickPicture(page, 470, 150);
  await page.waitForFunction(() => document.querySelectorAll("#line-list li:not(.hint)").length === 1);
  await run(page);
  await showView(page, "Results");
  assert.match(await page.locator("#movements-table").innerText(), /need two or more in the plan; this plan has one/);

  // Reloaded, the person's own plan goes on without the demo's files under it (a newcomer's
  // re-trial: their line over the demo's boxes, and Run now offered on them).
  await page.reload();
  await page.waitForSelector("body[data-ready=true]");
  assert.equal(await page.locator("#detections-name").innerText(), "none");
  assert.equal(await page.locator("#line-list li:not(.hint)").count(), 1, "the line drawn");
  assert.match(await page.locator("#messages").innerText(), /Your plan is kept from last time/);
  // Out of date once the detections are open again (a newcomer's trial: it stayed on, and on a
  // phone pushed the tabs down).
  await page.getByLabel("Open detections").setInputFiles(demo("detections.csv"));
  await page.waitForFunction(() => !/Your plan is kept from last time/.test(document.getElementById("messages").textContent));
  assert.doesNotMatch(await page.locator("#messages").innerText(), /This is the bundled demo/);
  // … and the demo is a click away.
  await page.reload();
  await page.waitForSelector("body[data-ready=true]");
  assert.match(await page.locator("#messages").innerText(), /Your plan is kept from last time/);
  await page.getByRole("button", { name: "Open the demo" }).click();
  await page.waitForFunction(() => /demo detections\.csv/.test(document.getElementById("detections-name").textContent));
  await page.waitForFunction(() => document.querySelectorAll("#line-list li:not(.hint)").length === 2);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
