// Typing in the plan panel keeps the keyboard where the person put it: a line or zone is selected on
// the picture, one of the plan's fields (a name, a direction, a ground coordinate) is typed in and Tab
// pressed, then Backspace. The plan panel must not take the focus away from the fields (a panel
// rebuilt on every edit did), so that Backspace never reaches the picture's "delete the selected
// line" shortcut: the saved plan is the same before and after it.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, mkdtempSync } from "node:fs";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { useBrowser, openPage, screenshot, demo } from "./harness.mjs";

const env = useBrowser();
const scratch = mkdtempSync(join(tmpdir(), "tl-focus-"));

/** Clicks the picture at a point given in video pixels. */
async function clickPicture(page, x, y) {
  const canvas = page.locator("#overlay");
  const box = await canvas.boundingBox();
  const [w, h] = await canvas.evaluate((c) => [c.width, c.height]);
  await canvas.click({ position: { x: (x * box.width) / w, y: (y * box.height) / h } });
}

/** The plan as "Save plan" gives it. */
async function savedPlan(page, name) {
  const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "Save plan" }).click()]);
  const path = join(scratch, `${name}.json`);
  await download.saveAs(path);
  return JSON.parse(readFileSync(path, "utf8"));
}

/**
 * Opens the demo plan, selects the item under `at` (video pixels) on the picture, types `typed` into
 * the field labelled `field`, presses Tab, then Backspace. Returns the saved plan after Tab and after
 * Backspace, the field's value after Tab and the label of the control the focus went to.
 */
async function typeTabBackspace(page, { at, field, typed }) {
  await page.getByLabel("Open plan").setInputFiles(demo("plan.json"));
  await page.waitForFunction(() => document.querySelector("[aria-label='Name of line 1']")?.value === "plaza midline");
  await clickPicture(page, ...at);
  await page.getByLabel(field, { exact: true }).fill(typed);
  await page.keyboard.press("Tab");
  const value = await page.getByLabel(field, { exact: true }).inputValue();
  const focused = await page.evaluate(() => document.activeElement.getAttribute("aria-label"));
  const afterTab = await savedPlan(page, `${typed}-tab`);
  await page.keyboard.press("Backspace");
  const afterBackspace = await savedPlan(page, `${typed}-backspace`);
  return { value, focused, afterTab, afterBackspace };
}

const cases = [
  // The demo's first line runs from (20, 230) to (620, 230): (150, 230) is on it, away from its ends.
  { name: "a line's name", at: [150, 230], field: "Name of line 1", typed: "north walk", nextFocus: "Flip direction of north walk",
    names: (plan) => plan.screenlines.map((l) => l.name), want: ["north walk", "east-west divide"] },
  // The demo's zone is the rectangle (30, 260)-(190, 350): (110, 300) is inside it.
  { name: "a zone's name", at: [110, 300], field: "Name of zone 1", typed: "kiosk queue", nextFocus: "Delete kiosk queue",
    names: (plan) => plan.zones.map((z) => z.name), want: ["kiosk queue"] },
  // The direction names sit under visible captions; Tab goes from forward to backward.
  { name: "a line's forward direction", at: [150, 230], field: "Forward label of plaza midline", typed: "to the camera",
    nextFocus: "Backward label of plaza midline", names: (plan) => plan.screenlines.map((l) => l.forward), want: ["to the camera", "westbound"] },
  // The demo's first ground point is at ground (0, 0): its Y becomes 12; Tab goes on to its Delete.
  { name: "a ground point's Y", at: [150, 230], field: "Ground Y of G1", typed: "12", nextFocus: "Delete G1",
    names: (plan) => plan.calibration.pairs[0].ground, want: [0, 12] },
];

for (const c of cases) {
  test(`typing ${c.name}, Tab, Backspace: the field keeps its text and the plan loses nothing`, async () => {
    const { page, seen } = await openPage(env);

    const { value, focused, afterTab, afterBackspace } = await typeTabBackspace(page, c);
    assert.equal(value, c.typed, "the field shows what was typed after Tab");
    assert.deepEqual(c.names(afterTab), c.want, "the typed name is in the plan");
    assert.deepEqual(afterBackspace, afterTab, "Backspace changed nothing in the plan");
    assert.equal(focused, c.nextFocus, "Tab moved the focus to the next control of the same row");
    await screenshot(page, `11-focus-kept-${c.field.replace(/ /g, "-").toLowerCase()}`);

    assert.deepEqual(seen.foreign, []);
    assert.deepEqual(seen.errors, []);
    await page.close();
  });
}
