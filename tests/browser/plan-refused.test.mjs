// Counts left from a plan since changed into one the core refuses: the Results view says they are
// the plan before's, the Plan panel says so under what to fix, and nothing is handed in (the grid's
// and movements' copies and downloads are off, the client summary is not made) until the plan is
// mended; Undo brings the plan back and all of it with it. (A newcomer's trial: a plan opened with
// a problem left the earlier plan's counts shown, and handed in, without a word.)
import { test } from "node:test";
import assert from "node:assert/strict";
import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { useBrowser, openPage, run, showView, LAPTOP } from "./harness.mjs";
import { scratch } from "./review-helpers.mjs";

const env = useBrowser();

const HANDIN_BUTTONS = ["Copy grid", "Download grid CSV", "Copy movements", "Download movements CSV"];

/** Whether each hand-in button is disabled, in the order above. */
async function handinDisabled(page) {
  return Promise.all(HANDIN_BUTTONS.map((name) => page.getByRole("button", { name, exact: true }).isDisabled()));
}

test("counts of the plan before a refused one are said to be so and are not handed in", async () => {
  const { page } = await openPage(env, { viewport: LAPTOP });
  await run(page);
  await showView(page, "Results");
  await page.waitForSelector("#handin:not([hidden])");
  assert.equal(await page.locator("#results-stale").innerText(), "", "no note while the plan is the one counted");
  assert.deepEqual(await handinDisabled(page), [false, false, false, false]);
  const totals = await page.locator("#summary").innerText();

  // A line of one point: the page takes the plan (the person can mend it) and the core refuses it.
  const onePoint = join(scratch, "plan-one-point.json");
  writeFileSync(onePoint, JSON.stringify({ frame_rate: 25, screenlines: [{ name: "gate", points: [[10, 10]] }] }));
  await showView(page, "Set up");
  await page.getByLabel("Open plan").setInputFiles(onePoint);
  await page.waitForFunction(() => /needs a fix/.test(document.getElementById("plan-error").textContent));
  assert.match(await page.locator("#plan-error").innerText(), /screenlines\[0\]\.points[\s\S]*The counts shown are still those of the plan before this change\./);

  await showView(page, "Results");
  assert.match(await page.locator("#results-stale").innerText(), /These counts are of the plan as it was before its last change, which needs a fix/);
  assert.equal(await page.locator("#summary").innerText(), totals, "the counts themselves are left as they were");
  assert.deepEqual(await handinDisabled(page), [true, true, true, true]);
  assert.match(await page.locator("#handin-missing").innerText(), /Nothing can be handed in while the plan needs a fix/);
  await page.getByRole("button", { name: "Make summary" }).click();
  assert.match(await page.locator("#summary-status").innerText(), /Nothing can be handed in while the plan needs a fix/);
  assert.equal(await page.locator("#client-summary").isHidden(), true, "no summary made");

  // Undo: the plan counted is back, and with it the hand-in.
  await page.getByRole("button", { name: "Undo" }).first().click();
  await page.waitForFunction(() => document.getElementById("results-stale").textContent === "");
  assert.deepEqual(await handinDisabled(page), [false, false, false, false]);
  assert.doesNotMatch(await page.locator("#handin-missing").innerText(), /Nothing can be handed in/);
  await page.getByRole("button", { name: "Make summary" }).click();
  await page.waitForFunction(() => /Summary made/.test(document.getElementById("summary-status").textContent));
});
