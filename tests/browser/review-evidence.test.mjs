// Evidence pictures: every count event of the demo, on the evidence sheet of its line or zone, has
// a picture cut from the footage in the page, and the picture is that event's moment: each is
// compared with the same square of the same frame as Debian's ffmpeg decodes it (select the frame,
// crop, scale to the picture's size) and is near it (a mean difference under 20 of 255: JPEG, the
// line drawn over it and two decoders' colour conversions) and nearer to it than to the same
// square a second later (measured here: 3–17 against 24–60). Neighbouring frames differ too little
// at this size to tell apart this way; the frame itself is checked on the sheet's own record of it.
// The sheet prints alone.
import { test } from "node:test";
import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { useBrowser, showView, demo, screenshot } from "./harness.mjs";
import { reviewDemo, uncorrected } from "./review-helpers.mjs";

const env = useBrowser();
const SIDE = 112;

/** Frame `f` (1-based) of the demo footage, square [x, y, side] cropped and scaled, as RGB bytes (ffmpeg). */
function ffmpegSquare(f, [x, y, side]) {
  const filter = `select=eq(n\\,${f - 1}),crop=${side}:${side}:${x}:${y},scale=${SIDE}:${SIDE}:flags=bilinear`;
  return execFileSync("ffmpeg", ["-v", "error", "-i", demo("footage.webm"), "-vf", filter, "-frames:v", "1", "-f", "rawvideo", "-pix_fmt", "rgb24", "-"], { maxBuffer: 1 << 24 });
}

/** Mean absolute difference of two RGB pictures (0 to 255). */
function meanDiff(rgb, other) {
  let sum = 0;
  for (let i = 0; i < rgb.length; i++) sum += Math.abs(rgb[i] - other[i]);
  return sum / rgb.length;
}

test("every count event of the demo has its picture, of its own frame; the evidence sheet prints alone", async () => {
  const { page, seen } = await reviewDemo(env);
  await page.evaluate(() => { window.print = () => { document.body.dataset.printed = "yes"; }; });
  const report = uncorrected();
  await showView(page, "Results");
  const names = [...report.screenlines.map((l) => l.name), ...report.zones.map((z) => z.name)];
  let pictures = 0;
  for (const name of names) {
    await page.getByLabel("Line or zone").selectOption(name);
    await page.getByRole("button", { name: "Make evidence sheet" }).click();
    await page.waitForFunction((n) => document.getElementById("evidence-status").textContent.startsWith(`Evidence sheet of ${n}:`), name, { timeout: 60000 });
    const events = report.events.filter((e) => e.name === name);
    const shown = await page.locator("#evidence-sheet img").evaluateAll((imgs) => imgs.map((img) => {
      const c = document.createElement("canvas");
      c.width = img.naturalWidth;
      c.height = img.naturalHeight;
      const g = c.getContext("2d");
      g.drawImage(img, 0, 0);
      const rgba = g.getImageData(0, 0, c.width, c.height).data;
      return { width: img.naturalWidth, crop: img.dataset.crop, rgb: [...rgba].filter((_, i) => i % 4 !== 3) };
    }));
    assert.equal(shown.length, events.length, `${name}: one picture per count event`);
    for (const [i, p] of shown.entries()) {
      assert.equal(p.width, SIDE, `${name} event ${i}: a picture`);
      const [x, y, side, frame] = p.crop.split(",").map(Number);
      assert.equal(frame, events[i].frame, "the event's own frame");
      const same = meanDiff(p.rgb, ffmpegSquare(frame, [x, y, side]));
      const later = meanDiff(p.rgb, ffmpegSquare(Math.min(750, frame + 25), [x, y, side]));
      assert.ok(same < 20, `${name} event ${i} (frame ${frame}): ${same.toFixed(1)} from ffmpeg's frame`);
      assert.ok(same < later, `${name} event ${i} (frame ${frame}): ${same.toFixed(1)} from its frame, ${later.toFixed(1)} from a second later`);
      pictures++;
    }
    if (name === "east-west divide") await screenshot(page, "15-evidence-sheet");
  }
  assert.equal(pictures, report.events.length, "every count event");

  // Printing the sheet prints it alone.
  await page.getByRole("button", { name: "Print evidence sheet" }).click();
  assert.equal(await page.evaluate(() => document.body.dataset.printed), "yes");
  await page.emulateMedia({ media: "print" });
  assert.equal(await page.locator("#evidence-sheet").isVisible(), true);
  assert.equal(await page.locator("#results").isVisible(), false);
  assert.equal(await page.locator("#stage").isVisible(), false);
  await page.emulateMedia({ media: "screen" });
  assert.deepEqual(seen.errors, []);
  await page.close();
});
