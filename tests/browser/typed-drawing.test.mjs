// Drawing with the keyboard alone: "Add by typing coordinates" takes a line as "x1, y1 → x2, y2" and
// a zone as its corners, says what is wrong with points it cannot use (naming the point), and adds
// exactly the points typed. The saved plan must hold them, and `throughline run` must accept it.
import { test } from "node:test";
import assert from "node:assert/strict";
import { mkdtempSync, writeFileSync } from "node:fs";
import { execFileSync } from "node:child_process";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { useBrowser, openPage, screenshot, downloadText, demo, targetDir } from "./harness.mjs";

const cli = join(targetDir, "release/throughline");
const env = useBrowser();
const scratch = mkdtempSync(join(tmpdir(), "tl-typed-"));

test("a line and a zone typed as coordinates, keyboard only; bad points are named", async () => {
  const { page, seen } = await openPage(env);
  await page.getByLabel("Open plan").setInputFiles(demo("plan.json"));
  await page.waitForFunction(() => document.querySelector("[aria-label='Name of line 1']")?.value === "plaza midline");

  // Into the form from the tool buttons by Tab, open it with Enter: no pointer from here on.
  await page.getByRole("button", { name: "Add ground point" }).focus();
  await page.keyboard.press("Tab");
  assert.equal(await page.evaluate(() => document.activeElement.textContent), "Add by typing coordinates");
  await page.keyboard.press("Enter");
  await page.keyboard.press("Tab"); // the kind: "a line" to begin with
  assert.equal(await page.evaluate(() => document.activeElement.id), "coords-kind");
  await page.keyboard.press("Tab");
  const error = page.locator("#coords-error");

  // Mistakes first: each is named and nothing is added.
  for (const [typed, said] of [
    ["40, 300 → 700", /Point 2 \(“700”\) is not two numbers/],
    ["40, 300 → 900, 300", /Point 2 \(900, 300\) is outside the picture, which is 640 × 360 pixels/],
    ["40, 300", /1 point given, but a line needs its start and its end/],
  ]) {
    await page.keyboard.type(typed);
    await page.keyboard.press("Enter");
    assert.match(await error.innerText(), said);
    assert.equal(await page.getByLabel("Name of line 3").count(), 0, `nothing added for "${typed}"`);
    await page.keyboard.press("Control+a");
    await page.keyboard.press("Backspace");
  }

  await page.keyboard.type("40, 300 → 600, 300");
  await page.keyboard.press("Enter");
  assert.equal(await error.innerText(), "");
  assert.equal(await page.getByLabel("Name of line 3").inputValue(), "line 1");
  assert.match(await page.locator("#coords-done").innerText(), /Added “line 1”/);
  assert.equal(await page.evaluate(() => document.activeElement.id), "coords-points", "the keyboard stays in the field");

  await page.keyboard.press("Shift+Tab");
  await page.keyboard.press("ArrowDown"); // "a zone"
  assert.equal(await page.locator("#coords-kind").inputValue(), "zone");
  await page.keyboard.press("Tab");
  await page.keyboard.type("400, 260; 600, 260; 600, 340");
  await page.keyboard.press("Enter");
  assert.equal(await page.getByLabel("Name of zone 2").inputValue(), "zone 1");
  await screenshot(page, "16-typed-coordinates");

  const plan = JSON.parse(await downloadText(page, "Save plan", scratch));
  assert.deepEqual(plan.screenlines.find((l) => l.name === "line 1").points, [[40, 300], [600, 300]]);
  assert.deepEqual(plan.zones.find((z) => z.name === "zone 1").polygon, [[400, 260], [600, 260], [600, 340]]);
  const planPath = join(scratch, "typed-plan.json");
  writeFileSync(planPath, JSON.stringify(plan));
  execFileSync(cli, ["run", demo("detections.csv"), "--plan", planPath, "-o", join(scratch, "report.json"), "-q"]);
  assert.deepEqual(seen.foreign, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
