// Drawing tools end on their own: Escape ends one at once (dropping what was half drawn), and each
// ends after one line, zone or ground point, so the next click on the picture draws nothing by
// surprise. What the person sees: which tool button is pressed, and the plan's lists.
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser, openPage, clickPicture, screenshot, demo } from "./harness.mjs";

const env = useBrowser();

/** The name of the tool whose button is pressed. */
async function toolInUse(page) {
  return page.locator("[data-tool][aria-pressed=true]").innerText();
}

test("Escape ends a drawing tool; each tool ends after one use", async () => {
  const { page, seen } = await openPage(env);
  await page.getByLabel("Open plan").setInputFiles(demo("plan.json"));
  await page.waitForFunction(() => document.querySelector("[aria-label='Name of line 1']")?.value === "plaza midline");
  const lines = page.locator("#line-list li:not(.hint)");
  const zones = page.locator("#zone-list li:not(.hint)");
  const ground = page.locator("#calibration-list tbody tr");

  // Escape right after choosing a tool: the picture is back to moving things.
  await page.getByRole("button", { name: "Draw line" }).click();
  assert.equal(await toolInUse(page), "Draw line");
  await page.keyboard.press("Escape");
  assert.equal(await toolInUse(page), "Move");
  await clickPicture(page, 60, 320);
  await clickPicture(page, 580, 320);
  assert.equal(await lines.count(), 2, "clicks after Escape draw no line");

  // Escape half-way through a zone drops it.
  await page.getByRole("button", { name: "Draw zone" }).click();
  await clickPicture(page, 400, 260);
  await clickPicture(page, 600, 260);
  await page.keyboard.press("Escape");
  assert.equal(await toolInUse(page), "Move");
  await clickPicture(page, 600, 340);
  assert.equal(await zones.count(), 1, "no zone from the dropped corners");

  // One line, then the tool has ended.
  await page.getByRole("button", { name: "Draw line" }).click();
  await clickPicture(page, 60, 320);
  await clickPicture(page, 580, 320);
  assert.equal(await lines.count(), 3);
  assert.equal(await toolInUse(page), "Move");

  // One ground point, then the tool has ended: the next click adds none.
  await page.getByRole("button", { name: "Add ground point" }).click();
  await clickPicture(page, 300, 200);
  assert.equal(await ground.count(), 5);
  assert.equal(await toolInUse(page), "Move");
  await clickPicture(page, 350, 200);
  assert.equal(await ground.count(), 5, "a second click adds no second point");
  await screenshot(page, "17-tools-ended");
  assert.deepEqual(seen.errors, []);
  await page.close();
});

// Where the pointer is, in the picture's own pixels, to measure a person's height for the
// detector's two heights (a newcomer's trial: nothing on the page could measure them).
test("the pointer's place on the picture is shown in its pixels", async () => {
  const { page } = await openPage(env, { viewport: { width: 1366, height: 768 } });
  const canvas = page.locator("#overlay");
  const box = await canvas.boundingBox();
  const [w, h] = await canvas.evaluate((c) => [c.width, c.height]);
  await canvas.hover({ position: { x: (320 * box.width) / w, y: (180 * box.height) / h } });
  assert.match(await page.locator("#pointer-at").innerText(), /^x 3(19|20|21), y 1(79|80|81)$/);
  await page.mouse.move(5, 5);
  assert.equal(await page.locator("#pointer-at").innerText(), "");
  await page.close();
});
