// A hand count made with key presses over the second half of the demo (0:15 to 0:30, frames 376 to
// 750), pressing at the simulator's true crossings (demo-site/demo/truth_report.json, our own
// simulator's truth): the comparison the page shows puts the true counts beside the tool's count
// of the same frames (the command line's report of the same detections and plan), with the
// differences and APD, AAPD, WAPD and the correction factor as NCHRP Report 797 defines them
// (worked out here from those counts, formulas as in ../shared/notes/trade.md). Backspace takes
// back a wrong press; a press outside the sample is refused; each line's keys are drawn on the
// picture beside its sides. The demo is tracked with SORT on the boxes as given here
// (review-helpers.mjs, `PLAN_AS_GIVEN`; with the default rules it counts the demo as its truth):
// choosing the one difference
// lists the tool's event behind it (the walker counted twice at 0:20, track 25); rejecting it
// with R leaves no difference. On a phone
// the keys are buttons, and nothing scrolls sideways.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { useBrowser, openPage, run, showView, screenshot, demo, LAPTOP, PHONE } from "./harness.mjs";
import { goToFrame, uncorrected, withTheKnownDoubleCount, PLAN_AS_GIVEN } from "./review-helpers.mjs";
import { trueCrossings, startTally, pressAt, keyOf } from "./handin-helpers.mjs";

const env = useBrowser();
const FROM = 376;
const TO = 750;
const plan = JSON.parse(readFileSync(demo("plan.json"), "utf8"));
/** The plan's label of a line's direction. */
const label = (line, way) => plan.screenlines.find((l) => l.name === line)[way];

/** The comparison's rows on screen: {"line|direction": {hand, tool, difference, apd, aapd, wapd, factor}}. */
async function shownRows(page) {
  const rows = await page.locator(".tally-check").first().locator("tbody tr").evaluateAll((trs) => trs.map((tr) => [...tr.cells].map((c) => c.innerText.trim())));
  return Object.fromEntries(rows.map(([what, hand, tool, difference, apd, aapd, wapd, factor]) => {
    const [line, direction] = what.split("\n");
    return [direction ? `${line}|${direction.replace(/^[▲▼] /, "")}` : line, { hand: Number(hand), tool: Number(tool), difference, apd, aapd, wapd, factor }];
  }));
}

/** A share as the page prints it. */
const pct = (v, signed = false) => (v === null ? "n/a" : `${signed && v > 0 ? "+" : ""}${(100 * v).toFixed(1)}%`);

test("a tally by key presses over part of the demo is compared with the tool's count, against the simulator's truth", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await withTheKnownDoubleCount(page);
  await run(page);
  await showView(page, "Review");
  await startTally(page, "Ana", "0:15", "0:30");
  assert.match(await page.locator("#tally-status").innerText(), /Ana counting 0:15\.00–0:30\.00/);

  // One key per line and direction, on screen and on the picture beside the line's sides.
  const keys = {};
  for (const l of plan.screenlines) for (const way of ["forward", "backward"]) keys[`${l.name}|${way}`] = await keyOf(page, l.name, l[way]);
  assert.equal(new Set(Object.values(keys)).size, 4, `four keys: ${JSON.stringify(keys)}`);
  const onPicture = JSON.parse(await page.locator("#overlay").getAttribute("data-keycaps"));
  assert.deepEqual(onPicture.map((k) => [k.key, k.keycap]).sort(), [["line:0:backward", keys["plaza midline|backward"]], ["line:0:forward", keys["plaza midline|forward"]], ["line:1:backward", keys["east-west divide|backward"]], ["line:1:forward", keys["east-west divide|forward"]]].sort());

  // Outside the sample a press is refused, and said so.
  await pressAt(page, 300, keys["plaza midline|forward"]);
  assert.match(await page.locator("#tally-status").innerText(), /Not counted: frame 300 is outside the sample \(frames 376 to 750\)/);

  // A press at every true crossing of the sample (the simulator's truth), one wrong press taken back.
  const truth = trueCrossings(FROM, TO);
  assert.ok(truth.length >= 4, `${truth.length} true crossings in the sample`);
  for (const c of truth) await pressAt(page, c.frame, keys[`${c.name}|${c.direction}`]);
  await pressAt(page, 700, keys["east-west divide|forward"]);
  await page.keyboard.press("Backspace");
  assert.match(await page.locator("#tally-status").innerText(), /Taken back: east-west divide ▲ at frame 700/);
  const expected = {};
  for (const k of Object.keys(keys)) expected[k] = truth.filter((c) => `${c.name}|${c.direction}` === k).length;
  for (const [k, key] of Object.entries(keys)) {
    assert.equal(await page.locator(`#tally-keys button[data-key="${key}"] .count`).innerText(), String(expected[k]), `running count of ${k}`);
  }
  const drawn = JSON.parse(await page.locator("#overlay").getAttribute("data-keycaps"));
  assert.deepEqual(drawn.map((k) => Number(k.count)).reduce((a, b) => a + b), truth.length, "the presses are on the picture too");
  await screenshot(page, "16-hand-count-laptop", { fullPage: false });

  // Finished: beside the tool's count of the same frames (the command line's report: the same core).
  await page.getByRole("button", { name: "Finish and compare" }).click();
  await page.waitForSelector(".tally-check tbody tr");
  const tool = uncorrected("sort", PLAN_AS_GIVEN).events.filter((e) => e.kind === "screenline" && e.frame >= FROM && e.frame <= TO);
  const rows = await shownRows(page);
  const pairs = [];
  for (const [k, m] of Object.entries(expected)) {
    const [line, way] = k.split("|");
    const a = tool.filter((e) => `${e.name}|${e.direction}` === k).length;
    const row = rows[`${line}|${label(line, way)}`];
    assert.equal(row.hand, m, `${k}: by hand = the simulator's truth`);
    assert.equal(row.tool, a, `${k}: the tool's count of frames ${FROM}-${TO}`);
    assert.equal(row.difference, a - m > 0 ? `+${a - m}` : String(a - m));
    pairs.push([a, m]);
  }
  // NCHRP Report 797 over the sample's one bin per line and direction (15 s: one bin), pooled.
  const withM = pairs.filter(([, m]) => m > 0);
  const apd = withM.reduce((s, [a, m]) => s + (a - m) / m, 0) / withM.length;
  const aapd = withM.reduce((s, [a, m]) => s + Math.abs(a - m) / m, 0) / withM.length;
  const [sumA, sumM] = pairs.reduce(([sa, sm], [a, m]) => [sa + a, sm + m], [0, 0]);
  const wapd = pairs.reduce((s, [a, m]) => s + Math.abs(a - m), 0) / sumM;
  const total = rows["All lines together"];
  assert.deepEqual([total.hand, total.tool, total.apd, total.aapd, total.wapd, total.factor], [sumM, sumA, pct(apd, true), pct(aapd), pct(wapd), (sumM / sumA).toFixed(3)]);
  // All eight columns fit beside the footage on a laptop (a newcomer's trial: the factor was
  // scrolled out of sight).
  assert.ok(await page.locator(".tally-check .tally-table").first().evaluate((t) => t.parentElement.scrollWidth <= t.parentElement.clientWidth + 1), "the comparison fits its box");
  // On the demo: the tool counts one walker twice on the divide (westbound, frame 500).
  assert.equal(rows[`east-west divide|${label("east-west divide", "forward")}`].difference, "+1");
  const card = page.locator(".tally-check").first();
  assert.match(await card.innerText(), /Sample size: 15\.0 s of footage \(07:00:15 to 07:00:30\), 4 crossings counted by hand/);
  assert.match(await card.locator(".caution").innerText(), /loose estimate/);

  // The difference lists the tool's event behind it; rejecting it (R, Enter) leaves none.
  await card.getByRole("button", { name: /^\+1: show the tool's count events of east-west divide, westbound/ }).click();
  const listed = card.locator(".bin-events .review-list button");
  assert.equal(await listed.count(), 1);
  assert.match(await listed.innerText(), /east-west divide: westbound[\s\S]*track 25/);
  await listed.click();
  await page.waitForFunction(() => /track 25/.test(document.getElementById("focus-strip").textContent));
  await page.keyboard.press("r");
  await page.getByLabel("Why it is wrong").fill("counted twice");
  await page.keyboard.press("Enter");
  await page.waitForFunction(() => document.querySelector(".tally-check tr.total").cells[3].textContent === "0");
  const after = (await shownRows(page))["All lines together"];
  assert.deepEqual([after.hand, after.tool, after.difference, after.wapd, after.factor], [sumM, sumM, "0", "0.0%", "1.000"]);
  assert.match(await page.locator("#tally-correction").innerText(), /No correction factor applied/);
  assert.match(await card.locator(".bin-events").innerText(), /The tool counted none here\.[\s\S]*track 25[\s\S]*rejected by you: counted twice/);
  await card.scrollIntoViewIfNeeded();
  await screenshot(page, "16-hand-count-compared-laptop", { fullPage: false });
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.foreign, []);
  await page.close();
});

test("a hand count deleted comes back: by its own button, and by the review's Undo", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await page.evaluate(() => localStorage.clear()); // the first test's hand count is kept
  await page.reload();
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  await run(page);
  await showView(page, "Review");
  await startTally(page, "Cleo", "0:00", "0:10");
  const first = plan.screenlines[0];
  await pressAt(page, 100, await keyOf(page, first.name, first.forward));
  await page.getByRole("button", { name: "Finish and compare" }).click();
  await page.waitForSelector(".tally-check tbody tr");
  const kept = () => page.evaluate(() => (JSON.parse(localStorage.getItem("throughline.review.v1") || "{}").extras || {}).tallies || []);
  assert.equal((await kept()).length, 1);
  const cards = page.locator(".tally-check");
  const deleted = async () => {
    await page.getByRole("button", { name: "Delete this hand count" }).click();
    await page.waitForFunction(() => !document.querySelector(".tally-check"));
    assert.deepEqual(await kept(), [], "gone from what the browser keeps too");
  };
  // Deleting is one click (a person's minutes of pressing): the page offers it back at once.
  await deleted();
  assert.match(await page.locator(".deleted-tally").innerText(), /Hand count by Cleo deleted\./);
  await page.getByRole("button", { name: "Bring it back" }).click();
  await page.waitForSelector(".tally-check tbody tr");
  assert.match(await cards.first().innerText(), /Hand count by Cleo/);
  assert.equal((await kept())[0].presses.length, 1);
  assert.equal(await page.locator(".deleted-tally").count(), 0);
  // The review's Undo takes back a deletion as it does a correction, and Redo deletes it again.
  await deleted();
  await page.getByRole("tab", { name: /^Edits/ }).click();
  await page.getByRole("button", { name: "Undo last change" }).click();
  await page.waitForSelector(".tally-check tbody tr", { state: "attached" });
  assert.equal((await kept()).length, 1);
  assert.equal(await page.locator(".deleted-tally").count(), 0, "the offer goes once it is back");
  await page.getByRole("button", { name: "Redo last change" }).click();
  await page.waitForFunction(() => !document.querySelector(".tally-check"));
  assert.deepEqual(await kept(), []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("a hand count under way goes on after a reload, its presses kept", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await page.evaluate(() => localStorage.clear());
  await page.reload();
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  await run(page);
  await showView(page, "Review");
  await startTally(page, "Dara", "0:00", "0:10");
  const first = plan.screenlines[0];
  const key = await keyOf(page, first.name, first.forward);
  await pressAt(page, 100, key);
  await pressAt(page, 140, key);
  await page.reload();
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  const note = page.locator(".message[data-key=tally-resumed]");
  assert.match(await note.innerText(), /The hand count by Dara \(frames 1 to 250, 2 presses so far\) was under way when the page closed: it goes on/);
  await note.getByRole("button", { name: "Show it" }).click();
  await page.waitForSelector("#tally-live:not([hidden])");
  // The footage goes to the last press, so counting goes on where it stopped.
  await page.waitForFunction(() => /^frame 140\b/.test(document.getElementById("clock").textContent));
  assert.match(await page.locator("#tally-status").innerText(), /Dara counting/);
  assert.equal(await page.locator(`#tally-keys button[data-key="${key}"] .count`).innerText(), "2");
  await pressAt(page, 180, key);
  assert.equal(await page.locator(`#tally-keys button[data-key="${key}"] .count`).innerText(), "3");
  await run(page);
  await page.getByRole("button", { name: "Finish and compare" }).click();
  await page.waitForSelector(".tally-check tbody tr", { state: "attached" });
  const kept = await page.evaluate(() => JSON.parse(localStorage.getItem("throughline.review.v1")).extras.tallies);
  assert.deepEqual(kept.map((t) => [t.who, t.presses.length]), [["Dara", 3]]);
  assert.equal(await page.evaluate(() => localStorage.getItem("throughline.tally-run.v1")), null, "nothing under way now");
  // Reloaded again, the page names the hand count kept beside the corrections.
  await page.reload();
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  assert.match(await page.locator(".message[data-key=work-kept]").innerText(), /0 corrections, 0 review decisions and 1 hand count are kept/);
  assert.equal(await page.locator(".message[data-key=tally-resumed]").count(), 0);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("on a phone the tally's keys are buttons, and nothing scrolls sideways", async () => {
  const { page, seen } = await openPage(env, { viewport: PHONE });
  await run(page);
  await showView(page, "Review");
  await startTally(page, "Ben", "0:00", "0:10");
  await goToFrame(page, 16);
  // The simulator's first true crossing: the divide, westbound, at frame 16 (truth_report.json).
  assert.deepEqual(trueCrossings(1, 250)[0], { frame: 16, name: "east-west divide", direction: "forward", class: "cyclist" });
  await page.getByRole("button", { name: /^east-west divide, westbound \(key/ }).click();
  const key = await keyOf(page, "east-west divide", "westbound");
  assert.equal(await page.locator(`#tally-keys button[data-key="${key}"] .count`).innerText(), "1");
  const [scroll, width] = await page.evaluate(() => [document.documentElement.scrollWidth, innerWidth]);
  assert.ok(scroll <= width, `counting: page ${scroll} px wide in a ${width} px window`);
  await screenshot(page, "16-hand-count-phone", { fullPage: false });
  // Discarding presses asks first (no Undo brings them back); kept when the answer is no.
  const asked = [];
  page.once("dialog", (d) => { asked.push(d.message()); d.dismiss(); });
  await page.getByRole("button", { name: "Discard" }).click();
  assert.match(asked[0] || "", /Discard this hand count and its 1 press\?/);
  assert.equal(await page.locator("#tally-live").isHidden(), false, "kept");
  page.once("dialog", (d) => d.accept());
  await page.getByRole("button", { name: "Discard" }).click();
  assert.equal(await page.locator("#tally-live").isHidden(), true);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
