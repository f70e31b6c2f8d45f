// Detections from a file that end before the footage does (nobody in view at the end): with the
// footage open, the page counts to the footage's end, as `throughline run --frames N` does, so
// the last interval is whole; the saved project replays on the command line to the same report,
// byte for byte (its footage's duration gives the length). The demo footage is 750 frames at 25
// a second (30 s; ffprobe counts 750 frames: crate/cli/tests/cli.rs).
import { test } from "node:test";
import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { useBrowser, openPage, run, showView, downloadText, demo, LAPTOP } from "./harness.mjs";
import { cli, scratch, pageReport } from "./review-helpers.mjs";

const env = useBrowser();

test("detections that end early are counted to the footage's end, as the command line's --frames counts them", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  // Intervals of 15 s: the demo's 750 frames make two whole ones; the boxes stop at frame 700.
  const plan = join(scratch, "plan-15s.json");
  const planText = readFileSync(demo("plan.json"), "utf8").replace('"interval_minutes": 15', '"interval_minutes": 0.25');
  assert.ok(planText.includes("0.25"));
  writeFileSync(plan, planText);
  const [header, ...rows] = readFileSync(demo("detections.csv"), "utf8").trimEnd().split("\n");
  const early = join(scratch, "early.csv");
  writeFileSync(early, [header, ...rows.filter((r) => Number(r.split(",")[0]) <= 700)].join("\n") + "\n");

  await page.getByLabel("Open plan").setInputFiles(plan);
  await page.getByLabel("Open detections").setInputFiles(early);
  await page.waitForFunction(() => /early\.csv/.test(document.getElementById("detections-name").textContent));
  await run(page);
  const report = await pageReport(page);
  const parsed = JSON.parse(report);
  assert.equal(parsed.frame_count, 750, "the footage's length, not the last box's frame");
  assert.deepEqual(parsed.screenlines[0].intervals.map((i) => i.partial), [false, false], "the last interval is whole");

  const out = join(scratch, "cli-750.json");
  execFileSync(cli, ["run", early, "--plan", plan, "--frames", "750", "-o", out, "-q"]);
  assert.equal(report, readFileSync(out, "utf8"), "the page's report is the command line's with --frames 750");

  // The saved project carries the footage's duration: its replay counts to the same end.
  await showView(page, "Set up");
  const project = join(scratch, "early-project.json");
  writeFileSync(project, await downloadText(page, "Save project", scratch));
  const replayed = join(scratch, "cli-project.json");
  execFileSync(cli, ["run", early, "--plan", plan, "--edits", project, "-o", replayed, "-q"]);
  assert.equal(report, readFileSync(replayed, "utf8"), "the project replays to the page's report");
  assert.deepEqual(seen.errors, []);
});
