// Editing the plan on the picture as a person would: drag a line's end, flip a direction, draw a zone
// (closing it on its first corner, and with Enter), undo, step frames with the keyboard. The saved plan
// must hold exactly those edits and be accepted by `throughline run`.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, mkdtempSync } from "node:fs";
import { execFileSync } from "node:child_process";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { useBrowser, watch, screenshot, demo, targetDir } from "./harness.mjs";

const cli = join(targetDir, "release/throughline");
const env = useBrowser();

/** Screen position of a point in video pixels. */
async function onScreen(page, x, y) {
  const canvas = page.locator("#overlay");
  const box = await canvas.boundingBox();
  const [w, h] = await canvas.evaluate((c) => [c.width, c.height]);
  return [box.x + (x * box.width) / w, box.y + (y * box.height) / h];
}

async function click(page, x, y) {
  const [sx, sy] = await onScreen(page, x, y);
  await page.mouse.click(sx, sy);
}

test("drag, flip, draw a zone, undo, step frames; the saved plan holds the edits", async () => {
  const page = await env.browser.newPage();
  const seen = watch(page, env.server.origin);
  await page.goto(`${env.server.origin}/`);
  await page.waitForSelector("body[data-ready=true]");
  await page.waitForFunction(() => document.getElementById("overlay").width === 640);

  // Drag the right-hand end of "plaza midline" from (620, 230) down to (620, 260).
  const [ax, ay] = await onScreen(page, 620, 230);
  const [bx, by] = await onScreen(page, 620, 260);
  await page.mouse.move(ax, ay);
  await page.mouse.down();
  await page.mouse.move((ax + bx) / 2, (ay + by) / 2, { steps: 4 });
  await page.mouse.move(bx, by, { steps: 4 });
  await page.mouse.up();

  await page.getByRole("button", { name: "Flip direction of east-west divide" }).click();

  // A zone closed by clicking its first corner, then undone.
  await page.getByRole("button", { name: "Draw zone" }).click();
  for (const [x, y] of [[400, 260], [600, 260], [600, 340], [400, 260]]) await click(page, x, y);
  assert.equal(await page.getByLabel("Name of zone 2").inputValue(), "zone 1");
  await page.locator("body").press("Control+z");
  assert.equal(await page.getByLabel("Name of zone 2").count(), 0, "undo removed the zone");

  // The same zone again, closed with Enter.
  await page.getByRole("button", { name: "Draw zone" }).click();
  for (const [x, y] of [[400, 260], [600, 260], [600, 340]]) await click(page, x, y);
  await page.locator("#clock").click(); // focus off the tool button, as a person's next click would
  await page.keyboard.press("Enter");
  assert.equal(await page.getByLabel("Name of zone 2").inputValue(), "zone 1");
  await screenshot(page, "7-edited-plan");

  // Frame stepping: three frames, then one second (25 frames).
  for (let i = 0; i < 3; i++) await page.keyboard.press("ArrowRight");
  await page.waitForFunction(() => document.getElementById("clock").textContent.startsWith("frame 4 "));
  await page.keyboard.press("Shift+ArrowRight");
  await page.waitForFunction(() => document.getElementById("clock").textContent.startsWith("frame 29 "));
  assert.match(await page.locator("#clock").innerText(), /0:01\.12/, "frame 29 starts at 28/25 s");

  const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "Save plan" }).click()]);
  const path = join(mkdtempSync(join(tmpdir(), "tl-edit-")), "plan.json");
  await download.saveAs(path);
  const plan = JSON.parse(readFileSync(path, "utf8"));
  const original = JSON.parse(readFileSync(demo("plan.json"), "utf8"));
  const midline = plan.screenlines.find((l) => l.name === "plaza midline");
  assert.deepEqual(midline.points[0], original.screenlines[0].points[0]);
  assert.ok(Math.abs(midline.points[1][0] - 620) <= 1 && Math.abs(midline.points[1][1] - 260) <= 1, `dragged end at ${midline.points[1]}`);
  const divide = plan.screenlines.find((l) => l.name === "east-west divide");
  assert.deepEqual(divide.points, [...original.screenlines[1].points].reverse(), "flip reverses the points");
  assert.equal(divide.forward, "westbound", "labels stay with the arrow's side");
  const zone = plan.zones.find((z) => z.name === "zone 1");
  assert.equal(zone.polygon.length, 3);
  for (const [p, q] of zone.polygon.map((p, i) => [p, [[400, 260], [600, 260], [600, 340]][i]])) {
    assert.ok(Math.abs(p[0] - q[0]) <= 1 && Math.abs(p[1] - q[1]) <= 1, `corner ${p} near ${q}`);
  }
  assert.equal(plan.calibration.pairs.length, 4, "the ground points are kept");
  execFileSync(cli, ["run", demo("detections.csv"), "--plan", path, "-o", join(tmpdir(), "tl-edit-report.json"), "-q"]);

  assert.deepEqual(seen.foreign, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
