// Correcting a zone's entries and exits, as a person counting people in and out of an area would.
// In Review, Events: choose the first entry to the demo's kiosk zone, press R, say why, Enter: it is
// rejected. Then, with nothing in focus, step to frame 600, open "Add an entry or exit the tool
// missed", choose the kiosk and an exit, say why, Add: the kiosk loses one entry and gains one exit,
// the page says which were added and rejected, and the report equals `throughline run --edits`
// with the same two corrections written by hand, byte for byte.
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser, screenshot } from "./harness.mjs";
import { reviewDemo, openTab, goToFrame, countedWith, pageReport, replay, uncorrected } from "./review-helpers.mjs";

const env = useBrowser();

test("reject a zone's entry and add a missed exit; the zone's counts follow, as throughline run --edits gives them", async () => {
  const { page, seen } = await reviewDemo(env);
  const before = uncorrected();
  const at = before.events.findIndex((e) => e.kind === "zone");
  const entry = before.events[at];
  assert.deepEqual([entry.name, entry.direction, entry.track, entry.frame], ["kiosk", "entry", 10, 161]);

  await openTab(page, "Events");
  await page.locator("#events button").nth(at).click();
  assert.equal(await page.getByRole("button", { name: "Reject this entry" }).isVisible(), true);
  await page.keyboard.press("r");
  assert.match(await page.locator("#reject-question").innerText(), /^Reject the entry to kiosk by track 10 at frame 161/);
  assert.equal(await page.locator("#reject-submit").innerText(), "Reject entry");
  await page.getByLabel("Why it is wrong").fill("a reflection in the glass");
  await page.getByLabel("Why it is wrong").press("Enter");
  await countedWith(page, 1);
  await page.getByRole("button", { name: "Show all tracks" }).click();

  await goToFrame(page, 600);
  await page.getByText("Add an entry or exit the tool missed").click();
  await page.getByLabel("Zone", { exact: true }).selectOption("kiosk");
  await page.getByLabel("In or out").selectOption("exit");
  await page.getByLabel("Who (class)").fill("pedestrian");
  await page.getByLabel("Why missed").fill("left behind the van");
  assert.match(await page.locator("#add-zone-at").innerText(), /At frame 600 /);
  await page.getByRole("button", { name: "Add entry or exit" }).click();
  await countedWith(page, 2);
  await screenshot(page, "15b-zone-corrected", { fullPage: false });

  const want = replay([
    { edit: "reject_zone_event", zone: "kiosk", way: "entry", track: 10, frame: 161, reason: "a reflection in the glass" },
    { edit: "add_zone_event", zone: "kiosk", way: "exit", class: "pedestrian", frame: 600, reason: "left behind the van" },
  ]);
  const got = await pageReport(page);
  assert.equal(got, want, "equals throughline run --edits");
  const [was, now] = [before.zones[0], JSON.parse(got).zones[0]];
  assert.deepEqual([now.entries, now.exits, now.added, now.rejected], [was.entries - 1, was.exits + 1, 1, 1]);

  // Shown: the zone's totals with what was added and rejected, the corrections in words.
  await page.getByRole("tab", { name: "Results" }).click();
  const zones = await page.locator("#zones-table").innerText();
  assert.match(zones, /Added by hand\s+Rejected/);
  assert.match(zones, /after your corrections/);
  await page.getByRole("tab", { name: "Review" }).click();
  await openTab(page, "Edits");
  const edits = await page.locator("#edit-list").innerText();
  assert.match(edits, /Entry to kiosk by track 10 at frame 161 \([^)]*\) not counted/);
  assert.match(edits, /Exit from kiosk by a pedestrian added at frame 600/);
  await openTab(page, "Events");
  assert.match(await page.locator("#events").innerText(), /Rejected by you: not counted[\s\S]*kiosk/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
