// The work survives a reload: corrections and decisions made, the page reloaded (as after closing
// the tab), the page says the work is kept and that tracking must run again; Run now, and the
// corrections are applied to the new tracks: the report is byte for byte the one before the
// reload, the Edits list and the decisions are as they were. Undo has nothing to take back then,
// but each correction can be removed from the Edits list (with the decision it carried out).
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser, showView, screenshot } from "./harness.mjs";
import { reviewDemo, openTab, countedWith, pageReport, deleteTrack } from "./review-helpers.mjs";

const env = useBrowser();

test("reload: the corrections and decisions come back and are applied when tracks are made again", async () => {
  const { page, seen } = await reviewDemo(env);
  await deleteTrack(page, 19);
  await countedWith(page, 1);
  const deletedOnly = await pageReport(page);
  await openTab(page, "To check");
  const queued = await page.locator("#doubtful-list .doubt").count();
  await page.locator("#clock").click();
  await page.keyboard.press("n");
  await page.keyboard.press("r");
  await page.getByLabel("Why it is wrong").fill("one walker, counted twice");
  await page.getByLabel("Why it is wrong").press("Enter");
  await countedWith(page, 2);
  await page.keyboard.press("n");
  await page.keyboard.press("a");
  const before = await pageReport(page);
  await openTab(page, "Edits");
  const editsBefore = await page.locator("#edit-list").innerText();
  await openTab(page, "To check");
  const decided = await page.locator("#doubtful-list .decision").allInnerTexts();
  assert.deepEqual(decided.sort(), ["\u2713 accepted"], "the rejected moment left the queue; the accepted one is marked");

  await page.reload();
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  const message = page.locator(".message[data-key=work-kept]");
  assert.match(await message.innerText(), /Your 2 corrections and 2 review decisions are kept from last time\. Press Run to track again/);
  // The demo's plan, never changed here, is not called edited (a newcomer's trial).
  assert.equal(await page.locator("#plan-name").innerText(), "the demo's, kept from last time");
  await screenshot(page, "15-reloaded", { fullPage: false });
  // Run pressed (not the message's own button): the message goes once the work is applied (a
  // newcomer's trial: it stayed on after Run).
  await page.getByRole("button", { name: "Run", exact: true }).click();
  await page.waitForFunction(() => /tracks in/.test(document.getElementById("run-status").textContent), null, { timeout: 60000 });
  await countedWith(page, 2);
  await page.waitForSelector(".message[data-key=work-kept]", { state: "detached" });
  // Run's line: the tracker's own count, then what the corrections leave (track 19 left out).
  assert.match(await page.locator("#run-status").innerText(), /^28 tracks in [\d.]+ s; 27 after your corrections\.$/);
  await showView(page, "Review");
  assert.equal(await pageReport(page), before, "the same report as before the reload");
  await openTab(page, "Edits");
  assert.equal(await page.locator("#edit-list").innerText(), editsBefore);
  await openTab(page, "To check");
  assert.deepEqual(await page.locator("#doubtful-list .decision").allInnerTexts(), decided);

  // Undo has nothing to take back after a reload; a correction is still taken back from the list,
  // with the decision it carried out: the rejected moment is in the queue again, undecided.
  await openTab(page, "Edits");
  assert.equal(await page.getByRole("button", { name: "Undo last change" }).isDisabled(), true);
  await page.getByRole("button", { name: "Remove correction 2" }).click();
  await countedWith(page, 1);
  assert.equal(await pageReport(page), deletedOnly, "the counts of the one correction left");
  assert.match(await page.locator("#edit-list").innerText(), /^1\.\s+Track 19 left out/);
  await openTab(page, "To check");
  assert.equal(await page.locator("#doubtful-list .doubt").count(), queued, "the moment is back in the queue");
  assert.deepEqual(await page.locator("#doubtful-list .decision").allInnerTexts(), decided);
  // And that removal is itself undone by Undo.
  await openTab(page, "Edits");
  await page.getByRole("button", { name: "Undo last change" }).click();
  await countedWith(page, 2);
  assert.equal(await pageReport(page), before);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
