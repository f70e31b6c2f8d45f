// Handing in the interval grid and the movements: the page's downloads (the grid in both layouts,
// the movement matrix) equal what `throughline run --site … --start … --footage …` writes for the
// same files, byte for byte, and are named as it names them (site and date); the CSV's header
// block names the site, the recording, the plan and the files; Copy puts tab-separated text on the
// clipboard that pastes as the same cells as the CSV, row for row (each row one line, each cell
// one tab-separated field). With the demo's frames read at 0.2 a second (62.5 minutes: four whole
// 15-minute intervals) the peak hour and its factor are marked in the grid shown, and the files
// still equal the command line's with the plan the page saves.
import { test } from "node:test";
import assert from "node:assert/strict";
import { writeFileSync, copyFileSync } from "node:fs";
import { join } from "node:path";
import { useBrowser, openPage, run, showView, downloadText, screenshot, demo, LAPTOP, PHONE } from "./harness.mjs";
import { scratch } from "./review-helpers.mjs";
import { cliHandin, nameSite, SITE, STEM } from "./handin-helpers.mjs";

const env = useBrowser();

/** The cells of CSV text (RFC 4180: quoted fields may hold commas, quotes doubled), row by row. */
function csvCells(text) {
  const rows = [];
  let row = [];
  let cell = "";
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') [cell, i] = [cell + '"', i + 1];
      else if (c === '"') quoted = false;
      else cell += c;
    } else if (c === '"') quoted = true;
    else if (c === ",") [row, cell] = [[...row, cell], ""];
    else if (c === "\n") [rows[rows.length], row, cell] = [[...row, cell], [], ""];
    else cell += c;
  }
  return rows;
}

/** The cells of tab-separated text as a spreadsheet pastes it: a row per line, a cell per tab-separated field. */
function pastedCells(text) {
  return text.replace(/\n$/, "").split("\n").map((line) => line.split("\t"));
}

/** Presses a Copy button and reads what the clipboard then holds. */
async function copied(page, button) {
  await page.evaluate(() => navigator.clipboard.writeText(""));
  await page.getByRole("button", { name: button, exact: true }).click();
  await page.waitForFunction(async () => (await navigator.clipboard.readText()) !== "");
  return page.evaluate(() => navigator.clipboard.readText());
}

/** Results, Hand in, once it names the site and both files (their fingerprints are taken as they open). */
async function handIn(page) {
  await showView(page, "Results");
  await page.waitForFunction(() => /Detections\s*detections\.csv/.test(document.getElementById("grid-view")?.textContent || "") && /Footagefootage\.webm/.test(document.getElementById("grid-view").textContent) && /Footbridge plaza/.test(document.getElementById("grid-view").textContent));
}

test("grid and movements: downloads equal the command line's, copies paste as the same cells", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await env.browser.grantPermissions(["clipboard-read", "clipboard-write"], { origin: env.server.origin });
  await nameSite(page, SITE);
  await run(page);
  await handIn(page);
  const cli = cliHandin(["--footage", demo("footage.webm")]);
  assert.deepEqual(Object.keys(cli).sort(), [`${STEM}_grid-long.csv`, `${STEM}_grid.csv`, `${STEM}_movements.csv`, `${STEM}_summary.html`, "report.json"]);

  const wide = await downloadText(page, "Download grid CSV", scratch);
  assert.equal(wide, cli[`${STEM}_grid.csv`], "wide grid = throughline run --site --start");
  // The header block: what was counted, where, from what, and the caution (common practice for a hand-in sheet).
  const head = csvCells(wide).slice(0, 9);
  assert.deepEqual(head.map((r) => r[0]), ["Site", "Recording", "Plan", "Footage", "Detections", "Counted with", "Corrections", "Last interval", "Caution"]);
  assert.deepEqual(head.slice(0, 5).map((r) => r[1]), [SITE, "from 2026-03-02T07:00:00, 0.5 minutes (750 frames at 25 fps)", "plan.json", "footage.webm", "detections.csv"]);
  assert.equal(head[6][1], "none", "no corrections made");
  // 30 s of footage: its one interval is said to be of part of 15 minutes (a newcomer's trial:
  // pasted, it read as a whole interval's count, a flow rate 30 times too low).
  assert.equal(head[7][1], "2026-03-02T07:00:00 to 2026-03-02T07:15:00 covers only 0.5 of its 15 minutes (the footage ends inside it): its counts are of that part, not of a whole interval");
  assert.match(head[8][1], /estimates[\s\S]*manual count[\s\S]*recording people/);
  const tab = await copied(page, "Copy grid");
  assert.deepEqual(pastedCells(tab), csvCells(wide), "the copied grid pastes as the CSV's cells");
  const table = pastedCells(tab).slice(10, 13);
  // Interval start and end, 2 lines × 2 directions × the classes counted, total, peak hour, note.
  const columns = 2 + 10 + 3;
  assert.deepEqual(table.map((r) => r.length), [columns, columns, columns]);
  assert.deepEqual([table[1][0], table[2][0]], ["2026-03-02T07:00:00", "Total"]);
  // Then the kiosk zone's entries and exits per interval (a newcomer's trial: a zone's counts
  // reached no file handed in).
  const zones = pastedCells(tab).slice(16);
  assert.deepEqual(zones.map((r) => r[0]), ["Zones: entries and exits per interval (all classes)", "Interval start", "2026-03-02T07:00:00", "Total"]);
  assert.deepEqual(zones[1], ["Interval start", "Interval end", "kiosk entries", "kiosk exits", "Note"]);
  assert.match(await page.locator("#grid-copied").innerText(), /Copied: 20 rows, up to 15 cells each/);
  assert.deepEqual(await page.locator("#grid-view h4").allInnerTexts(), ["Zones: entries and exits per interval (all classes)"]);
  assert.match(await page.locator("#grid-view table").nth(1).innerText(), /kiosk entries\s+kiosk exits/);

  await page.getByLabel("Layout").selectOption("long");
  const long = await downloadText(page, "Download grid CSV", scratch);
  assert.equal(long, cli[`${STEM}_grid-long.csv`], "long grid = throughline run --site --start");
  const longCells = pastedCells(await copied(page, "Copy grid"));
  assert.deepEqual(longCells, csvCells(long));
  const rows = longCells.slice(10).filter((r) => r.length === 8);
  assert.deepEqual(rows[0], ["interval_start", "interval_end", "screenline", "direction", "class", "count", "peak_hour", "note"]);
  assert.ok(rows.slice(1).every((r) => r[7] === "cut short by the end of the footage"), "each row of the part interval says so");
  assert.equal(rows.length, 1 + 10, "a row per interval, line, direction and class");

  const matrix = await downloadText(page, "Download movements CSV", scratch);
  assert.equal(matrix, cli[`${STEM}_movements.csv`], "movements = throughline run --site --start");
  assert.deepEqual(pastedCells(await copied(page, "Copy movements")), csvCells(matrix));
  assert.deepEqual(await page.locator("#matrix-view h4").allInnerTexts(), ["All classes", "Class: cyclist", "Class: pedestrian"]);
  await page.locator("#handin").scrollIntoViewIfNeeded();
  await screenshot(page, "16-handin-laptop", { fullPage: false });

  await page.setViewportSize(PHONE);
  const [scroll, width] = await page.evaluate(() => [document.documentElement.scrollWidth, innerWidth]);
  assert.ok(scroll <= width, `hand in on a phone: page ${scroll} px wide in a ${width} px window`);
  await page.locator("#handin").scrollIntoViewIfNeeded();
  await screenshot(page, "16-handin-phone", { fullPage: false });
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("the files name the plan file opened while the plan is still what it holds; changed here, the one Save plan writes", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await nameSite(page, SITE);
  // A newcomer's trial: a plan opened as myplan.json was named plan.json in the files handed in.
  const mine = join(scratch, "bridge-count-plan.json");
  copyFileSync(demo("plan.json"), mine);
  await page.getByLabel("Open plan").setInputFiles(mine);
  await run(page);
  await handIn(page);
  const wide = await downloadText(page, "Download grid CSV", scratch);
  assert.equal(wide, cliHandin(["--footage", demo("footage.webm")], mine)[`${STEM}_grid.csv`], "= the command line given that file");
  assert.equal(csvCells(wide)[2][1], "bridge-count-plan.json");
  assert.match(await page.locator("#handin-names").innerText(), /name the plan as bridge-count-plan\.json, the file you opened/);
  await page.getByRole("tab", { name: "Set up" }).click();
  await page.getByLabel("Path averaging (seconds)").fill("0.5");
  await page.getByLabel("Path averaging (seconds)").press("Tab");
  await handIn(page);
  await page.waitForFunction(() => /name the plan as plan\.json, the file Save plan writes/.test(document.getElementById("handin-names").textContent)
    && /Plan\s*plan\.json/.test(document.getElementById("grid-view").textContent));
  assert.equal(csvCells(await downloadText(page, "Download grid CSV", scratch))[2][1], "plan.json");
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("an hour and more of intervals: the peak hour and its factor are marked, and the files equal the command line's", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await nameSite(page, SITE);
  await page.getByLabel("Frame rate (fps)").fill("0.2");
  await page.getByLabel("Frame rate (fps)").press("Tab");
  await run(page);
  await handIn(page);
  await page.waitForFunction(() => document.querySelectorAll("#grid-view table")[0]?.querySelectorAll("tbody tr").length === 6);
  const shown = await page.locator("#grid-view table").first().locator("tbody tr").evaluateAll((trs) => trs.map((tr) => [tr.className, tr.cells[0].textContent]));
  assert.deepEqual(shown.map(([c]) => c), ["peak", "peak", "peak", "peak", "", "total"], "four whole intervals make the peak hour");
  const notes = await page.locator("#grid-view .peak-note").allInnerTexts();
  assert.match(notes[0], /^Peak hour \(all lines\): 2026-03-02T07:00:00 to 2026-03-02T08:00:00, \d+$/);
  assert.match(notes[1], /^Peak hour factor: 0\.\d{3}, busiest interval \d+$/);
  // The grid (15 columns) is wider than the panel on a laptop: a line under it says it scrolls.
  await page.locator("#grid-view").scrollIntoViewIfNeeded();
  const wide = page.locator("#grid-view .wide-note").first();
  await wide.waitFor({ state: "visible" });
  assert.match(await wide.innerText(), /^\u2194 \d+ columns, more than the panel shows: scroll the table sideways/);
  assert.equal(await page.locator("#matrix-view .wide-note").first().isHidden(), true, "the movements table fits: no such line");

  await showView(page, "Set up");
  const planPath = join(scratch, "plan.json");
  writeFileSync(planPath, await downloadText(page, "Save plan", scratch));
  await showView(page, "Results");
  const cli = cliHandin(["--footage", demo("footage.webm")], planPath);
  assert.equal(await downloadText(page, "Download grid CSV", scratch), cli[`${STEM}_grid.csv`]);
  await page.getByLabel("Layout").selectOption("long");
  const long = await downloadText(page, "Download grid CSV", scratch);
  assert.equal(long, cli[`${STEM}_grid-long.csv`]);
  assert.ok(long.includes(",yes,\n") && long.includes(",no,"), "the long layout marks the peak hour's rows");
  await page.locator("#grid-view").scrollIntoViewIfNeeded();
  await screenshot(page, "16-handin-peak-hour-laptop", { fullPage: false });
  assert.deepEqual(seen.errors, []);
  await page.close();
});
