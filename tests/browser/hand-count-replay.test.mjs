// Hand counts kept and replayed: two people count the same sample in turn (one all classes
// together, one naming each press's class), a correction factor is chosen from the first count,
// and the project saved by the page replays on the command line: `throughline run --edits
// project.json` gives the page's report byte for byte (its checks and the factor applied among
// it), and `throughline score-counts --truth project.json` on that report gives the page's checks.
// The hand counts are kept in the browser too: after a reload they are listed again. The demo is
// tracked with SORT here, which counts one walker twice in the sample (the default `deepsort`
// counts the demo as its truth, and a factor would be 1).
import { test } from "node:test";
import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { useBrowser, openPage, run, showView, downloadText, LAPTOP } from "./harness.mjs";
import { pageReport, replay, scratch, cli, withTheKnownDoubleCount, PLAN_AS_GIVEN } from "./review-helpers.mjs";
import { trueCrossings, startTally, pressAt, keyOf, nameSite, SITE } from "./handin-helpers.mjs";

const env = useBrowser();

/** Keys of the demo's lines and directions while a tally runs: {"line|forward": key}. */
async function tallyKeys(page) {
  const out = {};
  for (const [line, f, b] of [["plaza midline", "towards camera", "towards bridge"], ["east-west divide", "westbound", "eastbound"]]) {
    out[`${line}|forward`] = await keyOf(page, line, f);
    out[`${line}|backward`] = await keyOf(page, line, b);
  }
  return out;
}

test("two hand counts and a chosen factor, saved in the project, replay with run --edits and score-counts", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await nameSite(page, SITE);
  await withTheKnownDoubleCount(page);
  await run(page);
  await showView(page, "Review");
  // The simulator's true crossings of 0:15 to 0:30 (truth_report.json).
  const truth = trueCrossings(376, 750);

  await startTally(page, "Ana", "0:15", "0:30");
  let keys = await tallyKeys(page);
  for (const c of truth) await pressAt(page, c.frame, keys[`${c.name}|${c.direction}`]);
  await page.getByRole("button", { name: "Finish and compare" }).click();
  await page.waitForSelector(".tally-check tbody tr");

  // Ben counts the same sample, naming each crossing's class, and misses the last one.
  await startTally(page, "Ben", "0:15", "0:30");
  keys = await tallyKeys(page);
  for (const c of truth.slice(0, -1)) {
    await page.getByLabel("Class of each press").selectOption(c.class);
    await pressAt(page, c.frame, keys[`${c.name}|${c.direction}`]);
  }
  await page.getByRole("button", { name: "Finish and compare" }).click();
  await page.waitForFunction(() => document.querySelectorAll(".tally-check tbody tr").length > 5);
  const ben = page.locator(".tally-check").nth(1);
  assert.match(await ben.locator("h4").innerText(), /^Hand count by Ben, /);
  assert.match(await ben.innerText(), /plaza midline\n▲ towards camera · pedestrian/, "Ben's classes are compared class by class");

  // A factor is applied only when chosen: Ana's pooled one (her 4 crossings over the tool's 5).
  const ana = page.locator(".tally-check").first();
  await ana.getByRole("button", { name: "Apply factor 0.800…" }).click();
  await ana.getByLabel("Why").fill("sample check");
  await ana.getByRole("button", { name: "Apply factor", exact: true }).click();
  await page.waitForFunction(() => /Adjusted totals/.test(document.getElementById("tally-correction").textContent));
  assert.match(await page.locator("#tally-correction").innerText(), /A correction factor of 0\.800 \(sample check\) is applied to plaza midline and east-west divide\. Adjusted totals: plaza midline 4\.0 forward, 0\.8 backward/);

  const report = await pageReport(page);
  await showView(page, "Results");
  assert.match(await page.locator("#correction-note").innerText(), /A correction factor of 0\.800 \(sample check\) is applied/);
  await showView(page, "Set up");
  const projectText = await downloadText(page, "Save project", scratch);
  const project = JSON.parse(projectText);
  assert.deepEqual(project.tallies.map((t) => [t.who, t.from_frame, t.to_frame, t.presses.length]), [["Ana", 376, 750, truth.length], ["Ben", 376, 750, truth.length - 1]]);
  assert.deepEqual(project.correction, { factor: 0.8, screenlines: ["plaza midline", "east-west divide"], reason: "sample check" });

  // The command line replays the project: the same report, checks and factor included (tracked
  // with the project's method, SORT, with no --method given).
  const projectPath = join(scratch, "replay-project.json");
  writeFileSync(projectPath, projectText);
  assert.equal(replay(projectPath, { plan: PLAN_AS_GIVEN }), report, "throughline run --edits project.json = the page's report");
  const parsed = JSON.parse(report);
  assert.equal(parsed.checks.length, 2);
  assert.equal(parsed.correction.factor, 0.8);
  const reportPath = join(scratch, "replay-report.json");
  writeFileSync(reportPath, report);
  const scored = JSON.parse(execFileSync(cli, ["score-counts", "--truth", projectPath, reportPath, "--json"], { encoding: "utf8" }));
  assert.deepEqual(scored, parsed.checks, "score-counts --truth project.json = the page's checks");

  // Kept in the browser: a reload lists both again.
  await page.reload();
  await page.waitForSelector("body[data-ready=true]");
  await showView(page, "Review");
  await page.getByRole("tab", { name: /^Hand count/ }).click();
  assert.equal(await page.locator(".tally-check h4").count(), 2);
  assert.match(await page.getByRole("tab", { name: /^Hand count/ }).innerText(), /Hand count\s*2$/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
