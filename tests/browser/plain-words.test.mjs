// The page speaks to people who did not build it: the tracking method by its name in the Method list
// (not the program's name for it), no documents they cannot open and no codec strings, and the two
// words of the trade it uses explained where they appear ("counted while hidden", "part"). A zone's
// numbers add up, and the page says how: first seen inside + entries = exits + last seen inside,
// with the exported report's own numbers. The demo's invitation to press Run does not outlive the run.
import { test } from "node:test";
import assert from "node:assert/strict";
import { mkdtempSync } from "node:fs";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { useBrowser, openPage, run, downloadText } from "./harness.mjs";

const env = useBrowser();
const scratch = mkdtempSync(join(tmpdir(), "tl-words-"));

test("results in plain words: the method's label, explained terms, zones that add up, no paths or codecs", async () => {
  const { page, seen } = await openPage(env);
  // The demo's invitation to press Run goes once Run has counted it (it would mislead after).
  await page.waitForFunction(() => /Press Run to track and count it/.test(document.getElementById("messages").textContent));
  await run(page);
  assert.doesNotMatch(await page.locator("#messages").innerText(), /Press Run/);
  const report = JSON.parse(await downloadText(page, "Export report", scratch));
  const summary = await page.locator("#summary").innerText();

  const method = report.tracker.method;
  const label = await page.locator(`#method option[value="${method}"]`).innerText();
  assert.notEqual(label, method);
  assert.match(summary, new RegExp(`Tracked with ${label.replace(/[()]/g, "\\$&")}\\.`));
  assert.doesNotMatch(summary, new RegExp(`\\b${method}\\b`), "the method's internal name is not shown");

  assert.ok(report.screenlines.some((l) => l.inferred > 0), "the demo has crossings counted while hidden");
  assert.match(summary, /Counted while hidden: crossings made while the person or vehicle was out of the camera's sight/);
  assert.match(await page.locator("#interval-table").innerText(), /\(part\): the footage ends before this interval does/);

  const zones = await page.locator("#zones-table").innerText();
  for (const z of report.zones) {
    assert.equal(z.present_at_start + z.entries, z.exits + z.present_at_end, "the report's zone numbers add up");
    assert.match(zones, new RegExp(`${z.name}: ${z.present_at_start} first seen inside \\+ ${z.entries} entries = ${z.exits} exits \\+ ${z.present_at_end} last seen inside\\.`));
  }

  // Nothing on the page, shown or not, points to a document the person cannot open, or names a codec.
  const text = await page.evaluate(() => document.body.textContent);
  assert.doesNotMatch(text, /docs\/|\.md\b/);
  assert.doesNotMatch(text, /\b(vp0?8|vp0?9|vp09|avc1|av01|hevc)\b/i);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
