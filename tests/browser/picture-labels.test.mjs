// The labels over the picture (count cards, names of lines, zones and ground points, track numbers)
// never cover one another and never run off the picture's edge, at any frame, on a laptop and on a
// phone. The page writes the labels it drew, and where, on the picture's canvas (data-labels, video
// pixels), which is what is checked here, alongside screenshots to look at.
import { test } from "node:test";
import assert from "node:assert/strict";
import { join } from "node:path";
import { useBrowser, openPage, run, artefacts, LAPTOP, PHONE } from "./harness.mjs";

const env = useBrowser();

/** Goes to frame `f` with the scrub bar and waits for the picture to show it. */
async function scrubTo(page, f) {
  await page.locator("#scrub").evaluate((s, want) => {
    s.value = String(want);
    s.dispatchEvent(new Event("input"));
  }, f);
  await page.waitForFunction((want) => document.getElementById("clock").textContent.startsWith(`frame ${want} `), f);
}

/** The labels drawn now, and the picture's size. */
async function labelsNow(page) {
  return page.locator("#overlay").evaluate((c) => ({ labels: JSON.parse(c.dataset.labels || "[]"), w: c.width, h: c.height }));
}

for (const [name, viewport] of [["laptop", LAPTOP], ["phone", PHONE]]) {
  test(`${name}: labels on the picture never overlap and stay inside it`, async () => {
    const { page, seen } = await openPage(env, { viewport });
    await run(page);
    await page.getByLabel("Numbers").check(); // every track's number too: the most labels there can be
    for (const f of [1, 120, 300, 480, 640, 750]) {
      await scrubTo(page, f);
      const { labels, w, h } = await labelsNow(page);
      assert.ok(labels.filter((l) => /^line:\d:(forward|backward)$/.test(l.key)).length === 4, `frame ${f}: both lines' count cards are drawn`);
      for (const l of labels) {
        assert.ok(l.x >= 0 && l.y >= 0 && l.x + l.w <= w && l.y + l.h <= h, `frame ${f}: ${l.key} at ${JSON.stringify(l)} leaves the ${w} × ${h} picture`);
      }
      // A track's number sits beside its own box (a few pixels off at most: the gap, the
      // rounding, the picture's edge), never further off where it would seem to name another.
      const numbers = labels.filter((l) => l.key.startsWith("track:"));
      assert.ok(numbers.length > 0, `frame ${f}: track numbers are drawn`);
      for (const l of numbers) {
        const b = l.of;
        const dx = Math.max(b.x - (l.x + l.w), l.x - (b.x + b.w), 0);
        const dy = Math.max(b.y - (l.y + l.h), l.y - (b.y + b.h), 0);
        assert.ok(Math.max(dx, dy) <= 16, `frame ${f}: ${l.key} at ${JSON.stringify(l)} is ${Math.max(dx, dy)} px from its box`);
      }
      for (let i = 0; i < labels.length; i++) {
        for (let j = i + 1; j < labels.length; j++) {
          const [a, b] = [labels[i], labels[j]];
          const apart = a.x + a.w <= b.x || b.x + b.w <= a.x || a.y + a.h <= b.y || b.y + b.h <= a.y;
          assert.ok(apart, `frame ${f}: ${a.key} and ${b.key} overlap`);
        }
      }
    }
    await scrubTo(page, 300);
    await page.locator("#stage").screenshot({ path: join(artefacts, `19-${name}-picture-labels.png`) });
    assert.deepEqual(seen.errors, []);
    await page.close();
  });
}
