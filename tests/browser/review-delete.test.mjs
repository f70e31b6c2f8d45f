// Deleting a track in the page, as a person would: choose track 19 in Review, Tracks (a pedestrian
// who crosses the plaza midline towards the camera), Delete…, give a reason, Delete track. Its
// crossing leaves the counts: the midline's forward count drops by one, and the page's report equals
// `throughline run --edits` with the same correction written by hand, byte for byte. The crossing
// it made stays listed apart (Events, "Made by tracks you deleted"), with the reason given, so a
// difference from a hand count can be traced to the deletion.
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser } from "./harness.mjs";
import { reviewDemo, chooseTrack, countedWith, pageReport, replay, uncorrected, screenTotals, reportTotals, openTab } from "./review-helpers.mjs";

const env = useBrowser();

test("delete: track 19 left out; its crossing leaves the counts, as throughline run --edits gives it", async () => {
  const { page, seen } = await reviewDemo(env);
  const before = uncorrected();
  const crossed = before.events.filter((e) => e.track_ids.includes(19));
  assert.deepEqual(crossed.map((e) => [e.name, e.direction]), [["plaza midline", "forward"]], "track 19 makes one count");
  await chooseTrack(page, 19);
  const box = page.locator("#tracks-correct");
  await box.getByRole("button", { name: "Delete this track (Tracks list)" }).click();
  await box.getByLabel("Reason (optional)").fill("a reflection in the glass");
  await box.getByRole("button", { name: "Delete track", exact: true }).click();
  await countedWith(page, 1);

  const got = await pageReport(page);
  assert.equal(got, replay([{ edit: "delete_track", track: { id: 19, frames: [339, 750] }, reason: "a reflection in the glass" }]), "equals throughline run --edits");
  const midline = JSON.parse(got).screenlines.find((l) => l.name === "plaza midline");
  assert.equal(midline.forward, before.screenlines.find((l) => l.name === "plaza midline").forward - 1);
  const deleted = JSON.parse(got).deleted_events;
  assert.deepEqual(deleted.map((e) => [e.track, e.name, e.direction, e.frame, e.reason]), [[19, "plaza midline", "forward", crossed[0].frame, "a reflection in the glass"]]);
  await openTab(page, "Events");
  const list = await page.locator("#events").innerText();
  assert.match(list, /Made by tracks you deleted: not counted[\s\S]*track 19[\s\S]*its track deleted · why: a reflection in the glass/);
  await page.getByRole("tab", { name: "Results" }).click();
  assert.deepEqual(await screenTotals(page), reportTotals(got));
  assert.equal(await page.locator("#focus-strip").isVisible(), false, "nothing left in focus");
  assert.deepEqual(seen.errors, []);
  await page.close();
});
