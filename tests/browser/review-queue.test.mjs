// Following the queue of doubtful moments on the demo, as a person would, keys only.
//
// First as README's walk-through goes, with the page's defaults: the demo's counts are the
// simulator's true counts (demo-site/demo/truth_report.json, made from the scene's own truth, not
// from the tracker); Review, N leads to the first moment (two crossings of the divide close
// together), look, A: it stands, and the counts stay the true ones.
//
// Then with a known mistake: the demo tracked with SORT and counted on the boxes as given
// (review-helpers.mjs, `PLAN_AS_GIVEN`), N (the first moment: two crossings of the east-west divide
// close together, the second counted while its walker was hidden), look, R, say why, Enter. That
// was a double count: the divide's counts are then the simulator's true counts. The page's queue
// holds as many moments as `throughline review --picture 640x360` (the demo footage's size) and
// leads with the one it lists first. The time the steps take is printed (not asserted: speed is
// measured, not tested).
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { execFileSync } from "node:child_process";
import { useBrowser, openPage, run, showView, demo, screenshot, LAPTOP } from "./harness.mjs";
import { cli, DEMO, countedWith, screenTotals, reportTotals, withTheKnownDoubleCount, PLAN_AS_GIVEN } from "./review-helpers.mjs";

const env = useBrowser();

test("with the defaults the demo's counts are the true ones; the queue's first moment is looked at and accepted", async () => {
  const cliQueue = JSON.parse(execFileSync(cli, ["review", DEMO.detections, "--plan", DEMO.plan, "--picture", "640x360", "--json", "-q"]).toString());
  const truth = reportTotals(readFileSync(demo("truth_report.json"), "utf8"));
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await run(page);
  await showView(page, "Results");
  assert.deepEqual(await screenTotals(page), truth, "as counted, every line is the truth");
  await showView(page, "Review");
  assert.equal(await page.locator("#doubtful-list li").count(), cliQueue.length, "as many moments as throughline review --picture 640x360");
  // A queue longer than the crossings counted is said not to be a list to finish, as the command
  // line's review says of a long one.
  const counted = await page.evaluate(() => document.getElementById("events-count").textContent);
  const status = await page.locator("#doubtful-status").innerText();
  if (cliQueue.length > Number(counted)) assert.match(status, /Not a list to finish: mistakes gather at its top/);
  else assert.doesNotMatch(status, /Not a list to finish/);
  console.log(`queue: ${cliQueue.length} moments, ${counted} count events`);
  const [first] = cliQueue;
  assert.deepEqual(first.kinds, ["close_together"], JSON.stringify(first));
  await page.keyboard.press("n");
  await page.waitForFunction((f) => document.getElementById("clock").textContent.startsWith(`frame ${f} `), first.frame);
  const strip = await page.locator("#focus-strip").innerText();
  assert.match(strip, new RegExp(`Doubtful moment 1 of ${cliQueue.length} · \\d:\\d\\d\\.\\d\\d · tracks ${first.tracks[0]} and ${first.tracks[1]} · two crossings close together`), strip);
  console.log(`queue walk-through, defaults: ${strip.split("\n")[0]}`);
  await screenshot(page, "15-queue-defaults-first", { fullPage: false });
  // As README says: the arrow keys step back and forth (the Review tab was clicked last, and a tab
  // in focus takes the arrows to change tabs until N lets go of it).
  const atFrame = (/** @type {number} */ f) => page.waitForFunction((g) => document.getElementById("clock").textContent.startsWith(`frame ${g} `), f);
  await page.keyboard.press("ArrowRight");
  await atFrame(first.frame + 1);
  await page.keyboard.press("ArrowLeft");
  await atFrame(first.frame);
  await page.keyboard.press("a");
  await page.waitForFunction(() => /Accepted: the count stands/.test(document.getElementById("focus-strip").textContent));
  assert.match(await page.locator("#doubtful-list li").first().innerText(), /accepted/);
  await showView(page, "Results");
  assert.deepEqual(await screenTotals(page), truth, "accepting changes no count");
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("the queue leads to the demo's double count; rejecting it gives the line's true counts", async () => {
  const cliQueue = JSON.parse(execFileSync(cli, ["review", DEMO.detections, "--plan", PLAN_AS_GIVEN, "--method", "sort", "--picture", "640x360", "--json", "-q"]).toString());
  const truth = reportTotals(readFileSync(demo("truth_report.json"), "utf8"));
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  const started = Date.now();
  await withTheKnownDoubleCount(page);
  await run(page);
  await showView(page, "Results");
  const before = await screenTotals(page);
  assert.notDeepEqual(before["east-west divide"], truth["east-west divide"], "as counted, the divide is off the truth");
  await showView(page, "Review");
  const first = page.locator("#doubtful-list li").first();
  // The page shows the names the command line writes between backticks as quoted names.
  const firstWhy = cliQueue[0].why[0].replace(/`([^`]*)`/g, "\u201C$1\u201D");
  assert.match(await first.innerText(), new RegExp(`${firstWhy.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}`), "the first moment is throughline review's first");
  const listed = await page.locator("#doubtful-list li").count();
  assert.equal(listed, cliQueue.length, "the page lists as many moments as throughline review --picture 640x360");
  assert.match(await page.getByRole("tab", { name: /To check/ }).getAttribute("aria-selected"), /true/, "Review opens on the queue");
  await page.keyboard.press("n");
  await page.waitForFunction(() => document.getElementById("clock").textContent.startsWith("frame 500 "));
  const strip = await page.locator("#focus-strip").innerText();
  assert.match(strip, /Doubtful moment 1 of \d+ · 0:19\.96 · tracks 20 and 25 · two crossings close together, counted while hidden/);
  await screenshot(page, "15-queue-first", { fullPage: false });
  await page.keyboard.press("r");
  // Two crossings close together: the person chooses which is wrong (a newcomer's trial: R always
  // took the later one, though the two may differ in class); the later is chosen at first.
  const which = page.locator("#reject-which");
  await which.waitFor();
  const choices = await which.locator("label").allInnerTexts();
  assert.equal(choices.length, 2, choices.join("\n"));
  assert.match(choices[0], /by track 20 at frame \d+/);
  assert.match(choices[1], /by track 25 at frame \d+/);
  assert.equal(await which.locator("input").nth(1).isChecked(), true);
  await screenshot(page, "15-queue-reject-which", { fullPage: false });
  await page.locator("#reject-reason").focus();
  await page.keyboard.type("one walker counted twice");
  await page.keyboard.press("Enter");
  await countedWith(page, 1);
  const seconds = (Date.now() - started) / 1000;
  console.log(`queue walk-through: from Run to the corrected count in ${seconds.toFixed(1)} s (test steps, no looking)`);
  await screenshot(page, "15-queue-rejected", { fullPage: false });

  await showView(page, "Results");
  const shown = await screenTotals(page);
  assert.deepEqual(shown["east-west divide"], truth["east-west divide"], "the divide's counts are the true counts");
  const row = await page.locator("#summary table tbody tr", { hasText: "east-west divide" }).locator("td").allInnerTexts();
  assert.equal(row.at(-1), "1", "one crossing rejected, and the page says so");
  assert.deepEqual(seen.errors, []);
  await page.close();
});
