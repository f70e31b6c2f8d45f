// The counts-per-interval charts, read as a person reads them: the demo read at 6.25 frames a
// second (its 750 frames then last two minutes) in 15-second intervals, the shortest a plan
// takes, gives eight intervals a line. Each line's chart must have whole-number ticks rising from 0 evenly
// to at least its tallest bar, a legend naming both directions, and the two directions' bars told
// apart by pattern as well as colour. The bar heights are the exported report's interval counts.
// (Ticks at whole steps of 1, 2 or 5 times a power of ten: common practice for count axes.)
import { test } from "node:test";
import assert from "node:assert/strict";
import { mkdtempSync } from "node:fs";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { useBrowser, openPage, showView, run, downloadText, artefacts, LAPTOP } from "./harness.mjs";

const env = useBrowser();
const scratch = mkdtempSync(join(tmpdir(), "tl-chart-"));

test("each line's chart: whole, evenly rising ticks from 0, a legend of both directions, bars by pattern", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await page.getByLabel("Frame rate (fps)").fill("6.25");
  await page.getByLabel("Frame rate (fps)").press("Tab");
  await page.getByLabel("Interval (minutes)").fill("0.25");
  await page.getByLabel("Interval (minutes)").press("Tab");
  await run(page);
  const report = JSON.parse(await downloadText(page, "Export report", scratch));
  await showView(page, "Results");
  const figures = page.locator("#chart figure");
  assert.equal(await figures.count(), report.screenlines.length, "one chart per line");

  for (const [i, line] of report.screenlines.entries()) {
    assert.equal(line.intervals.length, 8, "120 s of footage in 15 s intervals");
    const figure = figures.nth(i);
    const ticks = (await figure.locator("text.tick").allTextContents()).map((t) => t.trim());
    for (const t of ticks) assert.match(t, /^\d+$/, `tick "${t}" is a whole number`);
    const values = ticks.map(Number);
    assert.equal(values[0], 0);
    const step = values[1] - values[0];
    values.forEach((v, k) => assert.equal(v, k * step, `ticks ${values} rise evenly`));
    assert.ok([1, 2, 5, 10, 20, 50].includes(step), `step ${step}`);
    const tallest = Math.max(...line.intervals.flatMap((iv) => [iv.forward, iv.backward]));
    assert.ok(values[values.length - 1] >= tallest, `top tick ${values[values.length - 1]} reaches ${tallest}`);

    const legend = await figure.locator(".legend").innerText();
    assert.match(legend, new RegExp(`${line.forward_label} \\(forward\\)`));
    assert.match(legend, new RegExp(`${line.backward_label} \\(backward\\)`));
    const bars = await figure.locator("rect.bar").evaluateAll((rs) => rs.map((r) => ({
      dir: r.classList.contains("forward") ? "forward" : "backward", fill: r.getAttribute("fill"), title: r.textContent,
    })));
    const forward = bars.filter((b) => b.dir === "forward");
    const backward = bars.filter((b) => b.dir === "backward");
    assert.equal(forward.length, 8);
    assert.equal(backward.length, 8);
    assert.ok(forward.every((b) => !b.fill.startsWith("url(")), "forward bars are solid");
    assert.ok(backward.every((b) => b.fill.startsWith("url(#")), "backward bars are hatched");
    line.intervals.forEach((iv, k) => {
      assert.match(forward[k].title, new RegExp(`: ${iv.forward}$`));
      assert.match(backward[k].title, new RegExp(`: ${iv.backward}$`));
    });
  }
  await page.locator("#chart").screenshot({ path: join(artefacts, "15-chart-fifteen-second-intervals.png") });
  // Without a start time the intervals are labelled by the time since the footage began (a
  // newcomer's trial: the chart said "part" alone and the table "– (part)").
  await showView(page, "Set up");
  await page.getByLabel("Start time").fill("");
  await page.getByLabel("Start time").press("Tab");
  await showView(page, "Results");
  await page.waitForFunction(() => /00:00:15/.test(document.getElementById("interval-table").textContent));
  const labels = await figures.first().locator("svg > text:not(.tick)").allTextContents();
  assert.deepEqual(labels.slice(0, 3), ["00:00:00", "00:00:15", "00:00:30"]);
  assert.match(await page.locator("#interval-table").innerText(), /00:00:00–00:00:15/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
