// Many clips in the page: `throughline batch` counts three simulated clips of one site (two of
// camera north, one after the other, and one of camera south), and the page opens the merged
// counts it writes. For each camera and for all together, each cell of the grid the page shows is
// the sum, computed here from the CSV itself, of that interval's rows for the line and direction;
// a class chosen shows that class alone. The zones' merged file opens the same way, a zone over
// its entries and exits. A file that is not one is refused with its line.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, writeFileSync, mkdirSync } from "node:fs";
import { execFileSync } from "node:child_process";
import { join } from "node:path";
import { useBrowser, openPage, showView, screenshot, demo, LAPTOP, PHONE } from "./harness.mjs";
import { cli, scratch } from "./review-helpers.mjs";

const env = useBrowser();

/** Three clips of one site counted by `throughline batch`; the merged counts file's path. */
function batch() {
  const dir = join(scratch, "many-clips");
  mkdirSync(dir, { recursive: true });
  for (const [name, seed] of [["n1", "41"], ["n2", "42"], ["s", "43"]]) {
    execFileSync(cli, ["simulate", "--out-dir", join(dir, name), "--seed", seed, "--frames", "750"], { stdio: "ignore" });
  }
  writeFileSync(join(dir, "manifest.csv"), [
    "name,detections,plan,site,camera,start",
    `north-1,n1/detections.txt,${demo("plan.json")},Test Plaza,north,2026-03-02T07:14:40`,
    `north-2,n2/detections.txt,${demo("plan.json")},Test Plaza,north,2026-03-02T07:15:10`,
    `south,s/detections.txt,${demo("plan.json")},Test Plaza,south,2026-03-02T07:14:40`,
    "",
  ].join("\n"));
  execFileSync(cli, ["batch", join(dir, "manifest.csv"), "--out", join(dir, "out"), "-q"]);
  return join(dir, "out", "test-plaza_merged-counts.csv");
}

/** What the grid should hold, from the CSV: cell (interval start, "line: direction") → sum. */
function expected(text, camera, cls) {
  const cells = new Map();
  for (const line of text.trim().split("\n").slice(1)) {
    const [, cam, screenline, direction, klass, start, , count] = line.split(",");
    if (cam !== camera || (cls && klass !== cls)) continue;
    const key = `${start.replace("T", " ")}|${screenline}: ${direction}`;
    cells.set(key, (cells.get(key) || 0) + Number(count));
  }
  return cells;
}

/** What the page's grid holds: cell (interval start, column head) → number. */
async function shown(page) {
  return page.evaluate(() => {
    const table = document.querySelector("#merged-grid table");
    // The column of each count: its line (over a span of directions) and its direction.
    const lines = [...table.querySelectorAll("thead tr:first-child th.line")]
      .flatMap((th) => Array(Number(th.getAttribute("colspan"))).fill(th.textContent));
    const heads = ["", ...[...table.querySelectorAll("thead tr:nth-child(2) th")].map((th, k) => `${lines[k]}: ${th.textContent}`)];
    const cells = {};
    let day = "";
    for (const tr of table.querySelectorAll("tbody tr")) {
      if (tr.classList.contains("day")) {
        day = tr.textContent;
        continue;
      }
      const tds = [...tr.querySelectorAll("td")].map((td) => td.textContent);
      const start = `${day} ${tds[0].split("–")[0]}:00`;
      tds.slice(1, -1).forEach((n, k) => { cells[`${start}|${heads[k + 1]}`] = Number(n); });
    }
    return cells;
  });
}

test("a batch's merged counts open as an interval grid per camera and class, each cell the CSV's sum", async () => {
  const file = batch();
  const text = readFileSync(file, "utf8");
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await showView(page, "Results");
  await page.getByLabel("Open merged counts").setInputFiles(file);
  await page.waitForSelector("#merged-grid table");
  assert.match(await page.locator("#merged-status").innerText(), /^Test Plaza: 2 intervals, 3 cameras; 2 only partly recorded .*Counts are estimates/);
  const firstClass = text.split("\n")[1].split(",")[4];
  for (const [camera, cls] of [["north", ""], ["south", ""], ["all cameras", ""], ["north", firstClass]]) {
    await page.locator("#merged-camera").selectOption({ value: camera });
    await page.locator("#merged-class").selectOption({ value: cls });
    await page.waitForFunction(([c, k]) => document.querySelector("#merged-grid caption")?.textContent.endsWith(`${c} · ${k || "all classes"}`), [camera, cls]);
    const want = expected(text, camera, cls);
    assert.deepEqual(new Map(Object.entries(await shown(page))), want, `${camera}, ${cls || "all classes"}`);
  }
  // The two clips of north meet at 07:15:10, inside the 07:15 interval: it holds both clips' crossings.
  assert.match(text, /\nTest Plaza,north,[^\n]*,2026-03-02T07:15:00,2026-03-02T07:30:00,\d+,yes,north-1 north-2\n/);
  // The zones' merged file beside it opens the same way: a zone over its entries and exits.
  const zonesFile = file.replace("_merged-counts.csv", "_merged-zones.csv");
  const zones = readFileSync(zonesFile, "utf8");
  await page.getByLabel("Open merged counts").setInputFiles(zonesFile);
  await page.waitForFunction(() => document.querySelector("#merged-grid caption")?.textContent.endsWith("north · all classes"));
  assert.deepEqual(new Map(Object.entries(await shown(page))), expected(zones, "north", ""), "zones, north");
  assert.deepEqual(await page.locator("#merged-grid thead tr:nth-child(2) th").allInnerTexts(), ["entry", "exit"]);
  await page.getByLabel("Open merged counts").setInputFiles(file);
  await page.waitForFunction(() => document.querySelectorAll("#merged-grid thead tr:nth-child(2) th").length === 4);
  await screenshot(page, "20-many-clips-laptop");
  const phone = await openPage(env, { viewport: PHONE });
  await showView(phone.page, "Results");
  await phone.page.getByLabel("Open merged counts").setInputFiles(file);
  await phone.page.waitForSelector("#merged-grid table");
  await screenshot(phone.page, "20-many-clips-phone");
  assert.equal(await phone.page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth), true, "no sideways scrolling on a phone");
  // Not a merged counts file: refused with its line.
  const wrong = join(scratch, "not-merged.csv");
  writeFileSync(wrong, "screenline,direction,class,interval_start,interval_end,count\n");
  await page.getByLabel("Open merged counts").setInputFiles(wrong);
  await page.waitForFunction(() => /not-merged\.csv: line 1: not a merged counts file/.test(document.getElementById("merged-status").textContent));
  assert.equal(await page.locator("#merged-grid").isVisible(), false);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(phone.seen.errors, []);
  await page.close();
  await phone.page.close();
});
