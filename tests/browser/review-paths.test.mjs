// The path drawn for a track under review is the one the counting used. Tracked with SORT, the
// demo's walker of track 25 passes just below the lower end of the east-west divide at 0:20; for
// three frames its box jumps about 15 px up, into the line's reach. Counted on the boxes as given
// (`rules.smooth_seconds` 0) that jump is a westbound crossing; on the demo's own plan, whose
// paths are averaged over 0.35 s, the path stays below the line's end and nothing is counted.
// Chosen in Review, the track's path on the picture follows suit: it meets the divide's segment as
// often as the report counts that track there. And where the counting joined two fragments into
// one path (the demo's `deepsort` tracks 18 and 21, the report's `joins`), the step between them
// is drawn too, from the one's last counted point to the other's first.
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser, openPage, run, showView, screenshot, LAPTOP, demo } from "./harness.mjs";
import { chooseTrack, openTab, pageReport, withTheKnownDoubleCount } from "./review-helpers.mjs";

const env = useBrowser();
const TRACK = 25;
const DIVIDE = [[320, 90], [320, 350]];

/** The focused tracks' paths as the picture draws them, once every one is drawn as counted. */
async function drawnPaths(page, ids) {
  await page.waitForFunction((want) => {
    const paths = JSON.parse(document.getElementById("overlay").dataset.focusPaths || "[]");
    return want.every((id) => paths.some((p) => p.id === id && p.drawn === "counted"));
  }, ids);
  return JSON.parse(await page.locator("#overlay").getAttribute("data-focus-paths"));
}

/** Whether segments pq and rs cross (proper intersection; touching ends count). */
function cross([p, q], [r, s]) {
  const side = (a, b, c) => Math.sign((b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]));
  return side(p, q, r) * side(p, q, s) <= 0 && side(r, s, p) * side(r, s, q) <= 0;
}

/** How many steps of a path meet the east-west divide's segment. */
function meetsDivide(pts) {
  let n = 0;
  for (let i = 1; i < pts.length; i++) if (cross([pts[i - 1], pts[i]], DIVIDE)) n++;
  return n;
}

/** The report's crossings of the east-west divide by the track. */
async function counted(page) {
  const report = JSON.parse(await pageReport(page));
  return report.events.filter((e) => e.name === "east-west divide" && e.track === TRACK).length;
}

// First: the page as a newcomer finds it (the next test keeps its method and plan in storage).
test("two fragments the counting joined are drawn with the step between them", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await run(page);
  await showView(page, "Review");
  const report = JSON.parse(await pageReport(page));
  assert.deepEqual(report.joins.map((j) => j.tracks), [[18, 21]]);
  const k = report.events.findIndex((e) => e.track_ids.length === 2);
  assert.deepEqual(report.events[k].track_ids, [18, 21]);
  await openTab(page, "Events");
  await page.locator("#events button").nth(k).click();
  const paths = await drawnPaths(page, [18, 21]);
  const steps = JSON.parse(await page.locator("#overlay").getAttribute("data-focus-steps"));
  const [a, b] = [18, 21].map((id) => paths.find((p) => p.id === id).pts);
  const near = (p, q) => Math.hypot(p[0] - q[0], p[1] - q[1]) < 0.1;
  assert.equal(steps.length, 1);
  assert.ok(near(steps[0][0], a[a.length - 1]) && near(steps[0][1], b[0]), JSON.stringify(steps));
  assert.equal(await page.locator("#overlay").getAttribute("data-counted-paths-error"), null);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("a track under review is drawn on the path its count was made from", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await withTheKnownDoubleCount(page);
  await run(page);
  await showView(page, "Review");
  await chooseTrack(page, TRACK);
  const [asGiven] = await drawnPaths(page, [TRACK]);
  assert.equal(await counted(page), 1, "a crossing counted on the boxes as given");
  assert.equal(meetsDivide(asGiven.pts), 1, "the path drawn meets the divide once");

  const before = JSON.stringify([asGiven]);
  await page.setInputFiles("#open-plan", demo("plan.json"));
  await page.waitForFunction((was) => document.getElementById("overlay").dataset.focusPaths !== was, before);
  const [averaged] = await drawnPaths(page, [TRACK]);
  assert.equal(await counted(page), 0, "none counted on averaged paths");
  assert.equal(meetsDivide(averaged.pts), 0, "the path drawn passes below the divide's end");
  assert.ok(averaged.pts.some((p, i) => p[1] !== asGiven.pts[i][1]), "averaged, not the boxes' points");
  assert.match(await page.locator("#focus-strip").innerText(), /its whole path drawn as counted, over dots where its boxes were/);
  await screenshot(page, "review-averaged-path", { fullPage: false });
  assert.deepEqual(seen.errors, []);
  await page.close();
});
