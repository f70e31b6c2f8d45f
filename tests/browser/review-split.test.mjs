// Splitting a track in the page, as a person would: choose track 23 in Review, Tracks, step the
// footage to frame 663, Split here…, Split. From that frame on its boxes are a new track (numbered
// after the highest, 29), so one path more is counted and the kiosk loses the entry track 23 made
// at frame 655 (the split leaves it unconfirmed, docs/counting-rules.md "Zones"). The page's report
// must equal `throughline run --edits` with the same correction written by hand, byte for byte.
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser, screenshot } from "./harness.mjs";
import { reviewDemo, chooseTrack, goToFrame, countedWith, pageReport, replay, uncorrected } from "./review-helpers.mjs";

const env = useBrowser();

test("split: track 23 split at frame 663; one path more, as throughline run --edits gives it", async () => {
  const { page, seen } = await reviewDemo(env);
  await chooseTrack(page, 23);
  const box = page.locator("#tracks-correct");
  // Split is offered only inside the track: at its first frame there is nothing before to keep.
  assert.equal(await box.getByRole("button", { name: "Split here, at this frame (Tracks list)" }).isDisabled(), true);
  await goToFrame(page, 663);
  await box.getByRole("button", { name: "Split here, at this frame (Tracks list)" }).click();
  assert.match(await box.locator(".at-frame").innerText(), /From frame 663 \(0:26\.48\) on/);
  await box.getByRole("button", { name: "Split", exact: true }).click();
  await countedWith(page, 1);
  await screenshot(page, "15-split", { fullPage: false });

  const got = await pageReport(page);
  assert.equal(got, replay([{ edit: "split_track", track: { id: 23, frames: [436, 750] }, at_frame: 663 }]), "equals throughline run --edits");
  const report = JSON.parse(got);
  const before = uncorrected();
  assert.equal(report.tracks_counted, before.tracks_counted + 1, "one path more");
  assert.equal(report.zones[0].entries, before.zones[0].entries - 1, "the kiosk entry of track 23 is gone");
  assert.match(report.edits[0].note, /track 23 is two: 23 \(frames 436–662\) and 29 \(frames 663–750\)/);
  assert.match(await page.locator("#edit-list").innerText(), /Track 23 split in two at frame 663[\s\S]*applied: track 23 is two/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
