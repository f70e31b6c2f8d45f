// The path drawn for a track under review is the one the counting used. Tracked with SORT, the
// demo's walker of track 25 passes just below the lower end of the east-west divide at 0:20; for
// three frames its box jumps about 15 px up, into the line's reach. Counted on the boxes as given
// (`rules.smooth_seconds` 0) that jump is a westbound crossing; on the demo's own plan, whose
// paths are averaged over 0.35 s, the path stays below the line's end and nothing is counted.
// Chosen in Review, the track's path on the picture follows suit: it crosses the divide as often
// as the report counts that track there, one way and then the other.
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser, openPage, run, showView, screenshot, LAPTOP, demo } from "./harness.mjs";
import { chooseTrack, pageReport, withTheKnownDoubleCount } from "./review-helpers.mjs";

const env = useBrowser();
const TRACK = 25;

/** The focused track's path as the picture draws it, once drawn as counted: {drawn, pts}. */
async function drawnPath(page) {
  await page.waitForFunction((id) => {
    const paths = JSON.parse(document.getElementById("overlay").dataset.focusPaths || "[]");
    return paths.some((p) => p.id === id && p.drawn === "counted");
  }, TRACK);
  const paths = JSON.parse(await page.locator("#overlay").getAttribute("data-focus-paths"));
  return paths.find((p) => p.id === TRACK);
}

/** How often a path goes from one side of the east-west divide (x = 320, y 90 to 350) to the other. */
function sidesChanged(pts) {
  let n = 0;
  for (let i = 1; i < pts.length; i++) {
    const [[x0, y0], [x1, y1]] = [pts[i - 1], pts[i]];
    if (y0 >= 90 && y0 <= 350 && y1 >= 90 && y1 <= 350 && (x0 < 320) !== (x1 < 320)) n++;
  }
  return n;
}

/** The report's crossings of the east-west divide by the track. */
async function counted(page) {
  const report = JSON.parse(await pageReport(page));
  return report.events.filter((e) => e.name === "east-west divide" && e.track === TRACK).length;
}

test("a track under review is drawn on the path its count was made from", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await withTheKnownDoubleCount(page);
  await run(page);
  await showView(page, "Review");
  await chooseTrack(page, TRACK);
  const asGiven = await drawnPath(page);
  assert.equal(await counted(page), 1, "a crossing counted on the boxes as given");
  assert.equal(sidesChanged(asGiven.pts), 1, "the path drawn crosses the divide");

  const before = JSON.stringify([asGiven]);
  await page.setInputFiles("#open-plan", demo("plan.json"));
  await page.waitForFunction((was) => {
    const now = document.getElementById("overlay").dataset.focusPaths;
    return now !== was && JSON.parse(now || "[]").some((p) => p.drawn === "counted");
  }, before);
  const averaged = await drawnPath(page);
  assert.equal(await counted(page), 0, "none counted on averaged paths");
  assert.equal(sidesChanged(averaged.pts), 0, "the path drawn stays below the divide's end");
  assert.equal(averaged.pts.length, asGiven.pts.length, "one point a frame either way");
  await screenshot(page, "review-averaged-path", { fullPage: false });
  assert.deepEqual(seen.errors, []);
  await page.close();
});
