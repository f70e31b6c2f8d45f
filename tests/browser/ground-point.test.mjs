// Ground points for speeds, typed as a person would: a point clicked on the picture puts the keyboard
// in its ground X; X, Tab, Y, Tab fills both (a decimal comma is read as a point). A point with only
// one of the two is not silently dropped: the page names the point and what it lacks, under the plan
// and where speeds would be; text that is not a number is kept and said to be one.
import { test } from "node:test";
import assert from "node:assert/strict";
import { mkdtempSync } from "node:fs";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { useBrowser, openPage, showView, run, clickPicture, screenshot, downloadText, demo } from "./harness.mjs";

const env = useBrowser();
const scratch = mkdtempSync(join(tmpdir(), "tl-ground-"));

/** The label of the field that has the keyboard. */
const focused = (page) => page.evaluate(() => document.activeElement.getAttribute("aria-label"));

test("ground X and Y are typed; a half-typed point says what is missing instead of hiding speeds", async () => {
  const { page, seen } = await openPage(env);
  await page.getByLabel("Open plan").setInputFiles(demo("plan.json"));
  await page.waitForFunction(() => document.querySelector("[aria-label='Name of line 1']")?.value === "plaza midline");
  await run(page);
  await page.waitForSelector("#speeds-table table", { state: "attached" });

  await showView(page, "Set up");
  await page.getByRole("button", { name: "Add ground point" }).click();
  await clickPicture(page, 320, 200);
  await page.waitForFunction(() => document.activeElement?.getAttribute("aria-label") === "Ground X of G5");
  await page.keyboard.type("4");
  await page.keyboard.press("Tab");
  assert.equal(await focused(page), "Ground Y of G5");

  // Only X so far: the page says which point lacks what, and speeds wait.
  await page.waitForFunction(() => /G5 needs its ground Y/.test(document.getElementById("plan-error").textContent));
  await showView(page, "Results");
  await page.waitForFunction(() => /G5 needs its ground Y/.test(document.getElementById("speeds-missing")?.textContent || ""));
  await screenshot(page, "18-ground-point-half-typed");
  await showView(page, "Set up");

  // Not a number: kept in the field, marked, and said.
  await page.getByLabel("Ground Y of G5").fill("five");
  await page.keyboard.press("Tab");
  assert.equal(await page.getByLabel("Ground Y of G5").inputValue(), "five");
  assert.equal(await page.getByLabel("Ground Y of G5").getAttribute("aria-invalid"), "true");
  assert.match(await page.locator("#calibration-list").innerText(), /Ground Y of G5: “five” is not a number/);

  // Y typed with a decimal comma: both are in the plan, and speeds are back.
  await page.getByLabel("Ground Y of G5").fill("5,5");
  await page.keyboard.press("Tab");
  assert.equal(await page.getByLabel("Ground Y of G5").getAttribute("aria-invalid"), "false");
  await page.waitForFunction(() => document.getElementById("plan-error").textContent === "");
  const plan = JSON.parse(await downloadText(page, "Save plan", scratch));
  assert.deepEqual(plan.calibration.pairs[4].ground, [4, 5.5]);
  await showView(page, "Results");
  await page.waitForSelector("#speeds-table table");
  assert.deepEqual(seen.errors, []);
  await page.close();
});
