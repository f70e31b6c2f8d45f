// Correcting the counts themselves, as a person would. In Review, Events: choose the first
// crossing (track 9 westbound over the east-west divide at frame 16, counted while hidden), press R,
// say why, Enter: it is rejected. Then, with nothing in focus, step to frame 455, open "Add a
// crossing the tool missed", choose the plaza midline, "towards bridge", a pedestrian, say why, Add
// crossing. The divide loses one westbound count, the midline gains one towards the bridge, and the
// page says which were added and rejected. The report equals `throughline run --edits` with the
// same two corrections written by hand, byte for byte.
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser, screenshot } from "./harness.mjs";
import { reviewDemo, openTab, goToFrame, countedWith, pageReport, replay, uncorrected, screenTotals, reportTotals, chooseTrack } from "./review-helpers.mjs";

const env = useBrowser();

test("reject a crossing and add a missed one; the counts follow, as throughline run --edits gives them", async () => {
  const { page, seen } = await reviewDemo(env);
  const before = uncorrected();
  const first = before.events[0];
  assert.deepEqual([first.name, first.direction, first.track, first.frame], ["east-west divide", "forward", 9, 16]);

  await openTab(page, "Events");
  await page.locator("#events button").first().click();
  assert.equal(await page.getByRole("button", { name: "Reject this crossing" }).isVisible(), true);
  await page.keyboard.press("r");
  await page.getByLabel("Why it is wrong").fill("a shadow, not a cyclist");
  await page.getByLabel("Why it is wrong").press("Enter");
  await countedWith(page, 1);
  await page.getByRole("button", { name: "Show all tracks" }).click();

  await goToFrame(page, 455);
  await page.getByText("Add a crossing the tool missed").click();
  await page.getByLabel("Line", { exact: true }).selectOption("plaza midline");
  await page.getByLabel("Direction", { exact: true }).selectOption({ label: "towards bridge (backward)" });
  await page.getByLabel("Its class").fill("pedestrian");
  await page.getByLabel("Why it was missed").fill("missed in the crowd");
  assert.match(await page.locator("#add-at").innerText(), /At frame 455 \(0:18\.16\)/);
  await page.getByRole("button", { name: "Add crossing" }).click();
  await countedWith(page, 2);
  await screenshot(page, "15-crossings-corrected", { fullPage: false });

  const want = replay([
    { edit: "reject_crossing", screenline: "east-west divide", direction: "forward", track: 9, frame: 16, reason: "a shadow, not a cyclist" },
    { edit: "add_crossing", screenline: "plaza midline", direction: "backward", class: "pedestrian", frame: 455, reason: "missed in the crowd" },
  ]);
  const got = await pageReport(page);
  assert.equal(got, want, "equals throughline run --edits");
  const was = reportTotals(JSON.stringify(before));
  const now = reportTotals(got);
  assert.deepEqual(now["east-west divide"], { ...was["east-west divide"], forward: was["east-west divide"].forward - 1 });
  assert.deepEqual(now["plaza midline"], { ...was["plaza midline"], backward: was["plaza midline"].backward + 1 });
  const report = JSON.parse(got);
  assert.equal(report.rejected_events[0].reason, "a shadow, not a cyclist");

  // Shown: the totals with what was added and rejected, and both in the list of count events.
  await page.getByRole("tab", { name: "Results" }).click();
  assert.deepEqual(await screenTotals(page), now);
  const summary = await page.locator("#summary table").innerText();
  assert.match(summary, /Added by hand\s+Rejected/);
  await page.getByRole("tab", { name: "Review" }).click();
  const list = await page.locator("#events").innerText();
  assert.match(list, /plaza midline: towards bridge\s+pedestrian · added by hand · frame 455[^\n]*why: missed in the crowd/);
  assert.match(list, /Rejected by you: not counted[\s\S]*east-west divide: westbound[\s\S]*rejected · why: a shadow, not a cyclist/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("a crossing added with a track chosen is offered as that track's class and way across the line", async () => {
  const { page, seen } = await reviewDemo(env);
  // Track 8 is a cyclist that crosses the plaza midline towards the bridge (backward) at frame 42
  // (the command line's report of the demo; a newcomer's trial: the form offered a pedestrian going forward).
  const crossing = uncorrected().events.find((e) => e.track === 8 && e.name === "plaza midline");
  assert.deepEqual([crossing.direction, crossing.class, crossing.frame], ["backward", "cyclist", 42]);
  await chooseTrack(page, 8);
  await goToFrame(page, 42);
  await openTab(page, "Events");
  await page.getByText("Add a crossing the tool missed").click();
  assert.equal(await page.getByLabel("Line", { exact: true }).inputValue(), "plaza midline");
  assert.equal(await page.getByLabel("Its class").inputValue(), "cyclist");
  assert.equal(await page.getByLabel("Direction", { exact: true }).inputValue(), "backward");
  assert.match(await page.locator("#add-at").innerText(), /where track 8 meets the line/);
  // Track 4 crosses the divide eastbound (backward) at frame 113 and the midline towards the camera
  // (forward) at 436 (the command line's report): at each frame, the way over the line chosen is
  // the one it was counted going (a newcomer's re-trial: it was offered "towards bridge" throughout).
  const four = uncorrected().events.filter((e) => e.track === 4).map((e) => [e.name, e.direction, e.frame]);
  assert.deepEqual(four, [["east-west divide", "backward", 113], ["plaza midline", "forward", 436]]);
  await chooseTrack(page, 4);
  await openTab(page, "Events");
  for (const [name, way, frame] of four) {
    await goToFrame(page, frame);
    await page.getByLabel("Line", { exact: true }).selectOption(name);
    assert.equal(await page.getByLabel("Direction", { exact: true }).inputValue(), way, `track 4 at frame ${frame} over ${name}`);
  }
  assert.deepEqual(seen.errors, []);
  await page.close();
});
