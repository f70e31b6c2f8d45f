// Merging two tracks in the page, as a person would: in Review, Tracks, choose track 21 (a cyclist
// seen from frame 382 to 624), Merge…, and from the tracks not seen at the same time, nearest first,
// choose track 27 (a cyclist first seen at frame 627), give a reason, Merge (the later piece goes
// into the earlier, whose number the merged track keeps). Right or wrong as a
// judgement, the counts must follow at once, and be what `throughline run --edits` gives for that
// one correction, written here by hand in the edits file's format (docs/edits-format.md): byte for
// byte. On the demo this merge adds a crossing of the plaza midline (the joined path crosses it in
// the gap), so the counts visibly change.
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser, screenshot } from "./harness.mjs";
import { reviewDemo, chooseTrack, countedWith, pageReport, replay, screenTotals, reportTotals, uncorrected, openTab } from "./review-helpers.mjs";

const env = useBrowser();

test("merge: track 27 joins track 21; the counts follow, as throughline run --edits gives them", async () => {
  const { page, seen } = await reviewDemo(env);
  const before = await page.locator("#track-list button").count();
  await chooseTrack(page, 21);
  const box = page.locator("#tracks-correct");
  await box.getByRole("button", { name: "Merge with another track (Tracks list)" }).click();
  const choices = await box.getByLabel("Track to merge with").locator("option").allInnerTexts();
  // Only tracks that never share a frame with track 21 (frames 382–624) are offered, nearest first.
  const tracks = JSON.parse(replay([])).events; // (only to name the tracks the counting joins)
  assert.ok(tracks.some((e) => e.track_ids.join() === "18,21"), "the counting itself joins 18 and 21 (docs/counting-rules.md)");
  // First offered: track 18, which ends 1.8 s before track 21 begins, 0.7 box heights from it: the
  // piece the counting's own join rule puts with it. No offered track shares a frame with 21.
  assert.match(choices[0], /^track 18 · cyclist · ends 1\.8 s before, 0\.7 box heights away$/);
  const offered = choices.map((c) => Number(c.match(/^track (\d+)/)[1]));
  for (const id of [14, 15, 16, 19, 20, 22, 23]) assert.ok(!offered.includes(id), `track ${id} is seen while 21 is`);
  const later = choices.find((c) => c.startsWith("track 27 "));
  assert.match(later, /^track 27 · cyclist · starts 0\.1 s after, 5\.3 box heights away$/);
  await box.getByLabel("Track to merge with").selectOption({ label: later });
  await box.getByLabel("Reason (optional)").fill("one cyclist, lost in the crowd");
  await box.getByRole("button", { name: "Merge", exact: true }).click();
  await countedWith(page, 1);
  // What Run made, and what the corrections leave (a newcomer's trial: it still said 28 alone).
  await page.waitForFunction(() => /^28 tracks in [\d.]+ s; 27 after your corrections\.$/.test(document.getElementById("run-status").textContent));
  await screenshot(page, "15-merged", { fullPage: false });

  const want = replay([{ edit: "merge_tracks", track: { id: 27, frames: [627, 689] }, into: { id: 21, frames: [382, 624] }, reason: "one cyclist, lost in the crowd" }]);
  const got = await pageReport(page);
  assert.equal(got, want, "the page's report equals throughline run --edits with the hand-written merge");
  const report = JSON.parse(got);
  assert.equal(report.edits[0].applied, true);
  assert.notDeepEqual(reportTotals(got), reportTotals(JSON.stringify(uncorrected())), "the merge changed a line's counts");
  await page.getByRole("tab", { name: "Results" }).click();
  assert.deepEqual(await screenTotals(page), reportTotals(want), "the totals on screen are the corrected ones");
  await page.getByRole("tab", { name: "Review" }).click();
  await openTab(page, "Tracks");
  assert.equal(await page.locator("#track-list button").count(), before - 1, "one track fewer");
  assert.match(await page.locator("#focus-strip").innerText(), /track 21\b/, "the merged track, numbered as its first piece, stays in focus");
  assert.deepEqual(seen.errors, []);
  await page.close();
});
