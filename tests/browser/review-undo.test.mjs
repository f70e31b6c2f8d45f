// Undo and Redo of corrections, as a person would: two corrections (track 19 deleted, the first
// crossing rejected), then Undo (the button), Ctrl+Z, Ctrl+Shift+Z, Redo (the button). After each
// step the counts are at once those `throughline run --edits` gives for the corrections still made,
// byte for byte. Under Set up, Ctrl+Z undoes the plan instead, and the corrections stay.
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser, showView } from "./harness.mjs";
import { reviewDemo, openTab, countedWith, pageReport, replay, deleteTrack } from "./review-helpers.mjs";

const env = useBrowser();

const DELETE = { edit: "delete_track", track: { id: 19, frames: [339, 750] } };
const REJECT = { edit: "reject_crossing", screenline: "east-west divide", direction: "forward", track: 9, frame: 16 };

test("undo and redo: the counts follow each step, as throughline run --edits gives them", async () => {
  const { page, seen } = await reviewDemo(env);
  await deleteTrack(page, 19);
  await openTab(page, "Events");
  await page.locator("#events button").first().click();
  await page.getByRole("button", { name: "Reject this crossing" }).click();
  await page.getByRole("button", { name: "Reject crossing", exact: true }).click();
  await countedWith(page, 2);
  const both = replay([DELETE, REJECT]);
  assert.equal(await pageReport(page), both);

  /** One step, then the counts must be those of `edits`. */
  const step = async (how, edits) => {
    await how();
    await countedWith(page, edits.length);
    assert.equal(await pageReport(page), replay(edits), `after ${how.name || "a step"}: ${edits.length} corrections`);
  };
  await openTab(page, "Edits");
  await step(() => page.getByRole("button", { name: "Undo last change" }).click(), [DELETE]);
  await step(() => page.locator("#clock").click().then(() => page.keyboard.press("Control+z")), []);
  assert.equal(await page.getByRole("button", { name: "Undo last change" }).isDisabled(), true, "nothing left to undo");
  await step(() => page.keyboard.press("Control+Shift+z"), [DELETE]);
  await step(() => page.getByRole("button", { name: "Redo last change" }).click(), [DELETE, REJECT]);
  assert.equal(await page.getByRole("button", { name: "Redo last change" }).isDisabled(), true, "nothing left to redo");
  assert.match(await page.locator("#edit-list").innerText(), /1\.\s+Track 19 left out[\s\S]*2\.\s+Crossing of east-west divide, westbound, by track 9 at frame 16/);

  // Under Set up, Ctrl+Z undoes the plan: a renamed line gets its name back; the corrections stay.
  await showView(page, "Set up");
  const name = page.getByLabel("Name of line 1");
  await name.fill("midline");
  await name.press("Enter");
  await page.locator("#clock").click();
  await page.keyboard.press("Control+z");
  await page.waitForFunction(() => document.querySelector("[aria-label='Name of line 1']").value === "plaza midline");
  await countedWith(page, 2);
  await showView(page, "Review");
  assert.equal(await pageReport(page), both, "the corrections are untouched");
  assert.deepEqual(seen.errors, []);
  await page.close();
});
