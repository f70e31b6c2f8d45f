// The browser app driven as a person would: labelled file inputs, the drawing tool, Run, the exports.
// The report it downloads must equal `throughline run` on the same files, number for number (the CLI
// is this project's own reference for the page; the core under both is checked against SciPy,
// filterpy, OpenCV and TrackEval in crate/core/tests). Screenshots go to target/browser-artefacts/.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, writeFileSync, mkdtempSync } from "node:fs";
import { execFileSync } from "node:child_process";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { useBrowser, watch, screenshot, demo, site, targetDir, onTheDemo } from "./harness.mjs";

const cli = join(targetDir, "release/throughline");
const scratch = mkdtempSync(join(tmpdir(), "tl-browser-"));
const env = useBrowser();

async function openPage(url) {
  const page = await env.browser.newPage();
  const seen = watch(page, url.startsWith("file:") ? "file://" : env.server.origin);
  await page.goto(url);
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  await onTheDemo(page);
  return { page, seen };
}

/** Clicks the picture at a point given in video pixels. */
async function clickPicture(page, x, y) {
  const canvas = page.locator("#overlay");
  const box = await canvas.boundingBox();
  const size = await canvas.evaluate((c) => [c.width, c.height]);
  await canvas.click({ position: { x: (x * box.width) / size[0], y: (y * box.height) / size[1] } });
}

async function saveDownload(page, buttonName) {
  const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: buttonName, exact: true }).click()]);
  const path = join(scratch, download.suggestedFilename());
  await download.saveAs(path);
  return path;
}

/** Chooses what the page shows beside the footage: "Set up", "Review" or "Results". */
async function showView(page, name) {
  await page.getByRole("tab", { name }).click();
}

async function runAndWait(page) {
  await page.getByRole("button", { name: "Run", exact: true }).click();
  await page.waitForFunction(() => /tracks in/.test(document.getElementById("run-status").textContent), null, { timeout: 60000 });
}

test("open files, draw a line, run, and export what throughline run gives", async () => {
  const { page, seen } = await openPage(`${env.server.origin}/`);
  await page.getByLabel("Open footage").setInputFiles(demo("footage.webm"));
  await page.getByLabel("Open detections").setInputFiles(demo("detections.txt"));
  await page.getByLabel("Open plan").setInputFiles(demo("plan.json"));
  await page.waitForFunction(() => /boxes/.test(document.getElementById("detections-name").textContent));
  await screenshot(page, "1-files-open");

  await page.getByRole("button", { name: "Draw line" }).click();
  await clickPicture(page, 40, 300);
  await clickPicture(page, 600, 300);
  const newName = page.getByLabel("Name of line 3");
  assert.equal(await newName.inputValue(), "line 1");
  await newName.fill("south walk");
  await newName.press("Enter");
  await page.getByLabel("Forward label of south walk").fill("to the kiosk side");
  await page.getByLabel("Forward label of south walk").press("Tab");
  // The rules' fields show the core's defaults (plan::DEFAULT_HYSTERESIS, DEFAULT_SMOOTH_SECONDS)
  // and take no more than the core does (limits::MAX_HYSTERESIS, MAX_SMOOTH_SECONDS); the page's
  // own copies in index.html, shown until the engine starts, are the same.
  const averaging = page.getByLabel("Path averaging (seconds)");
  const margin = page.getByLabel("Crossing margin (× box height)");
  assert.equal(await margin.getAttribute("placeholder"), "0.1");
  assert.equal(await margin.getAttribute("max"), "2");
  assert.equal(await averaging.getAttribute("placeholder"), "0.35");
  assert.equal(await averaging.getAttribute("max"), "10");
  // A counting rule set in the page goes into the plan the command line is given below.
  await page.getByLabel("Path averaging (seconds)").fill("0.5");
  await page.getByLabel("Path averaging (seconds)").press("Tab");
  await screenshot(page, "2-line-drawn");

  await runAndWait(page);
  await page.waitForSelector("#results:not([hidden])");
  const summary = await page.locator("#summary").innerText();
  assert.match(summary, /south walk/);
  assert.match(summary, /plaza midline/);
  await screenshot(page, "3-counted");

  // Run leads on to the results, where the exports are; the plan is saved from Set up.
  const reportPath = await saveDownload(page, "Export report");
  const csvPath = await saveDownload(page, "Export counts CSV");
  const tracksPath = await saveDownload(page, "Export tracks");
  await showView(page, "Set up");
  const planPath = await saveDownload(page, "Save plan");
  await showView(page, "Results");
  const plan = JSON.parse(readFileSync(planPath, "utf8"));
  assert.equal(plan.screenlines.length, 3);
  assert.equal(plan.screenlines[2].forward, "to the kiosk side");
  assert.equal(plan.rules.smooth_seconds, 0.5);

  const cliReport = join(scratch, "cli-report.json");
  const cliCsv = join(scratch, "cli-counts.csv");
  const cliTracks = join(scratch, "cli-tracks.txt");
  execFileSync(cli, ["run", demo("detections.txt"), "--plan", planPath, "-o", cliReport, "--csv", cliCsv, "--tracks", cliTracks, "-q"]);
  assert.equal(readFileSync(reportPath, "utf8"), readFileSync(cliReport, "utf8"), "report equals throughline run");
  assert.equal(readFileSync(csvPath, "utf8"), readFileSync(cliCsv, "utf8"), "counts CSV equals throughline run");
  assert.equal(readFileSync(tracksPath, "utf8"), readFileSync(cliTracks, "utf8"), "tracks equal throughline run");

  // The counts on screen are the report's.
  const report = JSON.parse(readFileSync(reportPath, "utf8"));
  const line = report.screenlines.find((l) => l.name === "south walk");
  assert.match(summary, new RegExp(`to the kiosk side: ${line.forward}`));

  // Printed, the page is the results alone: headed with the footage and plan, caution included.
  assert.equal(await page.getByRole("button", { name: "Print counts" }).isEnabled(), true);
  await page.evaluate(() => window.dispatchEvent(new Event("beforeprint")));
  await page.emulateMedia({ media: "print" });
  assert.equal(await page.locator(".workspace-head").isVisible(), false);
  assert.equal(await page.locator("#view-setup").isVisible(), false);
  assert.equal(await page.locator("#stage").isVisible(), false);
  assert.equal(await page.locator("#events").isVisible(), false);
  assert.equal(await page.locator("#caution").isVisible(), true);
  assert.match(await page.locator("#print-head").innerText(), /footage: footage\.webm · plan: plan\.json · printed /);
  assert.match(await page.locator("#interval-table").innerText(), /south walk/);
  await screenshot(page, "3a-printed");
  await page.emulateMedia({ media: "screen" });
  assert.equal(await page.locator("#print-head").isVisible(), false);

  // An event is a click away from its moment in the footage (Review, Events).
  const first = report.events[0];
  await showView(page, "Review");
  await page.getByRole("tab", { name: /^Events/ }).click();
  await page.locator("#events button").first().click();
  await page.waitForFunction((f) => document.getElementById("clock").textContent.startsWith(`frame ${f} `), first.frame, { timeout: 10000 });
  await screenshot(page, "4-event-shown");

  // The plan is kept across a reload.
  await page.reload();
  await page.waitForSelector("body[data-ready=true]");
  assert.equal(await page.getByLabel("Name of line 3").inputValue(), "south walk");

  assert.deepEqual(seen.foreign, [], "no request leaves the page's origin");
  assert.deepEqual(seen.errors, [], "no errors in the console");
  assert.ok(seen.requests.every((r) => !r.includes("..")));
  await page.close();
});

test("files the page cannot use get messages that say what to do, and the plan survives them", async () => {
  const { page } = await openPage(`${env.server.origin}/`);
  const messages = page.locator("#messages");

  const notVideo = join(scratch, "broken.mp4");
  writeFileSync(notVideo, "this is not a video\n");
  await page.waitForFunction(() => /** @type {HTMLVideoElement} */ (document.getElementById("video")).readyState >= 1);
  await page.getByLabel("Open footage").setInputFiles(notVideo);
  await page.waitForFunction(() => /cannot play/.test(document.getElementById("messages").textContent));
  assert.match(await messages.innerText(), /ffmpeg -i "broken\.mp4" -c:v libvpx-vp9/);
  // The footage that played before goes on (a newcomer's re-trial: the picture went black).
  assert.match(await messages.innerText(), /demo footage\.webm stays open\./);
  await page.waitForFunction(() => /demo footage\.webm/.test(document.getElementById("footage-name").textContent));
  await page.waitForFunction(() => document.getElementById("overlay").width === 640);

  const badRows = join(scratch, "bad.txt");
  writeFileSync(badRows, "1,-1,10,20,-3,40,0.9\n");
  await page.getByLabel("Open detections").setInputFiles(badRows);
  await page.waitForFunction(() => /could not be read/.test(document.getElementById("messages").textContent));
  assert.match(await messages.innerText(), /line 1, column 5/);

  // Rows passed over and a last row perhaps cut short: the warning about the cut comes first, so
  // that it shows among the few the page lists, and the rest are said to be there.
  const cut = join(scratch, "cut.txt");
  const zeroWidth = Array.from({ length: 8 }, (_, k) => `${k + 1},-1,10,20,0,40,0.9`);
  writeFileSync(cut, [...zeroWidth, "9,-1,10,20,30,40,0.9", "10,-1,10,20,30,40,0.9"].join("\n"));
  await page.getByLabel("Open detections").setInputFiles(cut);
  await page.waitForFunction(() => /rows skipped/.test(document.getElementById("messages").textContent));
  const cutSaid = (await messages.innerText()).split("\n").filter((l) => l.trim());
  const head = cutSaid.findIndex((l) => /cut\.txt: 8 rows skipped\./.test(l));
  assert.ok(head >= 0, cutSaid.join("\n"));
  assert.match(cutSaid[head + 1], /line 10: the file ends without a line break after its last row \("10,-1,10,20,30,40,0\.9"\)/);
  assert.match(cutSaid[head + 6], /… and 4 more\./);
  // More rows passed over than the core lists: its closing "N passed over in all" line is the
  // first line's count again, not one more warning (a review: "… and 16 more" for 15).
  const many = join(scratch, "many.txt");
  const manyZero = Array.from({ length: 25 }, (_, k) => `${k + 1},-1,10,20,0,40,0.9`);
  writeFileSync(many, [...manyZero, "26,-1,10,20,30,40,0.9", ""].join("\n"));
  await page.getByLabel("Open detections").setInputFiles(many);
  await page.waitForFunction(() => /many\.txt: 25 rows skipped/.test(document.getElementById("messages").textContent));
  const manySaid = (await messages.innerText()).split("\n").filter((l) => l.trim());
  const manyHead = manySaid.findIndex((l) => /many\.txt: 25 rows skipped\./.test(l));
  assert.match(manySaid[manyHead + 6], /^… and 15 more\.$/, manySaid.join("\n"));
  assert.ok(!manySaid.some((l) => /passed over in all/.test(l)), manySaid.join("\n"));
  // A plan file taken that cannot be used in full says so where it says it was opened (a
  // newcomer's trial: "Plan opened." and the problem only further down the Plan panel).
  const onePoint = join(scratch, "one-point.json");
  writeFileSync(onePoint, JSON.stringify({ frame_rate: 25, screenlines: [{ name: "gate", points: [[10, 10]] }] }));
  await page.getByLabel("Open plan").setInputFiles(onePoint);
  await page.waitForFunction(() => /Plan opened, but it cannot be used in full until this is fixed/.test(document.getElementById("messages").textContent));
  assert.match(await messages.innerText(), /Plan opened, but [^\n]*screenlines\[0\]\.points/);
  await page.getByRole("button", { name: "Undo" }).first().click();
  await page.getByLabel("Open detections").setInputFiles(cut);
  await page.waitForFunction(() => /cut\.txt: 8 rows skipped/.test(document.getElementById("messages").textContent));
  // A file that cannot be read after one that could: the one in use is named as still in use (a
  // newcomer's trial: "not read" was shown, and Run then counted the earlier file unsaid).
  await page.getByLabel("Open detections").setInputFiles(badRows);
  await page.waitForFunction(() => /could not be read/.test(document.getElementById("messages").textContent));
  assert.match(await messages.innerText(), /bad\.txt could not be read: .*The detections in use are unchanged: cut\.txt: 2 boxes, 10 frames\./);
  assert.equal(await page.locator("#detections-name").innerText(), "cut.txt: 2 boxes, 10 frames");

  const notJson = join(scratch, "plan-typo.json");
  writeFileSync(notJson, '{"frame_rate": 25,, }');
  await page.getByLabel("Open plan").setInputFiles(notJson);
  // Named at its line and column in the core's words, as the command line names it (a newcomer's
  // re-trial: the browser's own parser gave neither).
  await page.waitForFunction(() => /plan-typo\.json was not opened: line 1, column \d+/.test(document.getElementById("messages").textContent));
  assert.match(await messages.innerText(), /The plan in use is unchanged/);
  assert.equal(await page.getByLabel("Name of line 1").inputValue(), "plaza midline", "the plan in use is kept");

  // A plan the page can mend (a line of one point) is taken, with what to mend.
  const wrongField = join(scratch, "plan-field.json");
  writeFileSync(wrongField, '{"frame_rate": 25, "screenlines": [{"name": "a", "points": [[0, 0]]}]}');
  await page.getByLabel("Open plan").setInputFiles(wrongField);
  await page.waitForFunction(() => /needs a fix/.test(document.getElementById("plan-error").textContent));
  assert.match(await page.locator("#plan-error").innerText(), /screenlines/);
  await page.getByRole("button", { name: "Undo" }).first().click();
  assert.equal(await page.getByLabel("Name of line 1").inputValue(), "plaza midline", "undo brings the plan back");
  // One only the file can mend is not taken: the message names the file and the line in it, as
  // the command line does (a newcomer's trial: a misspelt field was taken, and Run counted nothing).
  const misspelt = join(scratch, "plan-misspelt.json");
  writeFileSync(misspelt, '{\n  "frame_rate": 25,\n  "screenlines": [\n    {"name": "a", "points": [[0, 0], [9, 9]], "foward": "in"}\n  ]\n}\n');
  await page.getByLabel("Open plan").setInputFiles(misspelt);
  await page.waitForFunction(() => /plan-misspelt\.json was not opened/.test(document.getElementById("messages").textContent));
  const said = await messages.innerText();
  assert.match(said, /line 4, column \d+: unknown field .foward./);
  assert.match(said, /The plan in use is unchanged/);
  assert.doesNotMatch(said, /docs\//, "the page does not point at documents it does not carry");
  assert.equal(await page.getByLabel("Name of line 1").inputValue(), "plaza midline", "the plan in use is kept");

  // Detections from a video twice the size of this one.
  const big = join(scratch, "big.txt");
  const rows = readFileSync(demo("detections.txt"), "utf8").trim().split("\n").slice(0, 3000).map((r) => {
    const f = r.split(",");
    for (const i of [2, 3, 4, 5]) f[i] = String(Number(f[i]) * 2);
    return f.join(",");
  });
  writeFileSync(big, rows.join("\n") + "\n");
  await page.getByLabel("Open footage").setInputFiles(demo("footage.webm"));
  await page.getByLabel("Open detections").setInputFiles(big);
  await page.waitForFunction(() => /different size/.test(document.getElementById("messages").textContent));

  // A plan drawn for a larger picture: its line below this one's is named (it would count nothing).
  const below = join(scratch, "plan-below.json");
  writeFileSync(below, '{"frame_rate": 25, "screenlines": [{"name": "crossing A", "points": [[60, 400], [600, 400]]}]}');
  await page.getByLabel("Open plan").setInputFiles(below);
  await page.waitForFunction(() => /wholly outside the picture/.test(document.getElementById("plan-error").textContent));
  assert.match(await page.locator("#plan-error").innerText(), /line .crossing A. lies wholly outside the picture \(640 × 360\)/);

  // A plan with no lines or zones.
  const empty = join(scratch, "empty-plan.json");
  writeFileSync(empty, '{"frame_rate": 25}');
  await page.getByLabel("Open plan").setInputFiles(empty);
  await page.getByLabel("Open detections").setInputFiles(demo("detections.txt"));
  await page.waitForFunction(() => /Ready/.test(document.getElementById("run-status").textContent));
  await runAndWait(page);
  assert.match(await messages.innerText(), /no lines or zones/);
  await screenshot(page, "5-messages");
  await page.close();
});

test("the single file works opened from disk, with nothing fetched", async () => {
  const { page, seen } = await openPage(`file://${join(site, "throughline-offline.html")}`);
  await page.waitForFunction(() => /boxes/.test(document.getElementById("detections-name").textContent));
  await runAndWait(page);
  await page.waitForSelector("#results:not([hidden])");
  assert.match(await page.locator("#summary").innerText(), /plaza midline/);
  await screenshot(page, "6-single-file");
  await showView(page, "Set up");
  // Finding objects in the bundled footage works from disk too: the worker reads the footage
  // through FileReaderSync and decodes it with WebCodecs.
  await page.getByRole("button", { name: "Find moving objects" }).click();
  await page.waitForFunction(() => /^Found \d+ boxes of moving objects over 750 frames .*decoded in this page/.test(document.getElementById("find-status").textContent), null, { timeout: 600000 });
  const fetched = seen.requests.filter((u) => !u.startsWith("blob:") && !u.startsWith("data:"));
  assert.deepEqual(fetched, [`file://${join(site, "throughline-offline.html")}`], "only the file itself is read");
  assert.deepEqual(seen.errors, []);
  await page.close();
});

/** `throughline detect` on ffmpeg's decoding of `footage` (FFmpeg, Debian's package): the reference for the page's own decoding. */
function detectWithFfmpeg(footage, settings) {
  const config = join(scratch, "detector.json");
  writeFileSync(config, JSON.stringify(settings));
  // A file, not a pipe: the command line reads a file twice, first for the background from the
  // whole clip, as the page does.
  const y4m = join(scratch, "frames.y4m");
  execFileSync("ffmpeg", ["-v", "error", "-y", "-i", footage, "-f", "yuv4mpegpipe", "-pix_fmt", "yuv420p", y4m]);
  return execFileSync(cli, ["detect", "--y4m", y4m, "--config", config, "-q"], { maxBuffer: 1 << 28 }).toString();
}

/** Opens footage and the demo plan, sets the two heights, finds objects; resolves to the status line. */
async function findInFootage(page, footage) {
  await showView(page, "Set up");
  await page.getByLabel("Open footage").setInputFiles(footage);
  await page.waitForFunction(() => !document.getElementById("find-objects").disabled);
  // The plan kept from an earlier test may have no lines: open the demo's.
  await page.getByLabel("Open plan").setInputFiles(demo("plan.json"));
  await page.getByLabel("Height at top edge (px)").fill("34");
  await page.getByLabel("Height at bottom edge (px)").fill("91");
  await page.getByRole("button", { name: "Find moving objects" }).click();
  await page.waitForFunction(() => !/^Found/.test(document.getElementById("find-status").textContent));
  await page.waitForFunction(() => /^Found \d+ boxes of moving objects/.test(document.getElementById("find-status").textContent), null, { timeout: 600000 });
  return page.locator("#find-status").innerText();
}

test("footage alone: the page decodes WebM and MP4 itself, finds what the command line finds, then tracks and counts", async () => {
  const settings = { far_height: 34, near_height: 91 };
  const { page, seen } = await openPage(`${env.server.origin}/`);
  const status = await findInFootage(page, demo("footage.webm"));
  assert.match(status, /over 750 frames .*decoded in this page from the WebM video/);
  assert.match(await page.locator("#fps-hint").innerText(), /is coded at 25\.00 fps, as set/);
  const found = Number(status.match(/Found (\d+) boxes/)[1]);
  // The demo has about 12 people in view over 700 frames after the warm-up.
  assert.ok(found > 3000, `${found} boxes`);
  // The page suggests the steadier crossing margin for boxes found in footage; one click sets it.
  await page.getByRole("button", { name: "Use 0.35" }).click();
  assert.equal(await page.getByLabel("Crossing margin (× box height)").inputValue(), "0.35");
  await runAndWait(page);
  await page.waitForSelector("#results:not([hidden])");
  assert.match(await page.locator("#summary").innerText(), /plaza midline/);
  // With guessed classes the interval chart and table can show one class: the table then holds
  // that class's counts from the report, and nothing else.
  const report = JSON.parse(readFileSync(await saveDownload(page, "Export report"), "utf8"));
  await page.getByLabel("Class", { exact: true }).selectOption("pedestrian");
  const shown = await page.locator("#interval-table tbody tr").evaluateAll((rows) => rows.map((r) => [...r.cells].map((c) => c.textContent)));
  const want = report.screenlines.flatMap((l) => l.intervals.flatMap((iv) => [["forward", l.forward_label], ["backward", l.backward_label]].map(([dir, label]) =>
    [l.name, label, "pedestrian", String(iv.by_class.pedestrian ? iv.by_class.pedestrian[dir] : 0)])));
  assert.deepEqual(shown.map((r) => [r[0], r[1], r[2], r[4]]), want);
  await screenshot(page, "9a-pedestrians-per-interval");
  await page.getByLabel("Class", { exact: true }).selectOption("");
  const exportedPath = await saveDownload(page, "Export detections");
  assert.match(exportedPath, /detections\.csv$/);
  const exported = readFileSync(exportedPath, "utf8");
  // The footage's length first (its last frames may hold no box: a count of the file reaches its
  // end); with the two heights every box has a guessed class: CSV with a class column.
  const [length, header, ...rows] = exported.trim().split("\n");
  assert.equal(length, "# footage_frames: 750");
  assert.equal(header, "frame,x,y,w,h,score,class");
  assert.equal(rows.length, found);
  // The background is learnt from the whole clip: people in view at the start are found at once.
  assert.equal(rows[0].split(",")[0], "1", "boxes from the first frame");
  assert.ok(rows.every((r) => /,(pedestrian|cyclist|vehicle)$/.test(r)));
  // Chromium's VP9 decoder and ffmpeg's give the same pixels, so the same boxes, byte for byte.
  assert.equal(exported, detectWithFfmpeg(demo("footage.webm"), settings), "page's detections equal throughline detect on ffmpeg's frames");
  // The saved plan carries the margin, and throughline run on the exported files gives the page's report.
  await showView(page, "Set up");
  const planPath = await saveDownload(page, "Save plan");
  assert.deepEqual(JSON.parse(readFileSync(planPath, "utf8")).rules, { hysteresis: 0.35, zone_hysteresis: 0.1 });
  const cliReport = join(scratch, "footage-report.json");
  execFileSync(cli, ["run", exportedPath, "--plan", planPath, "-o", cliReport, "-q"]);
  assert.deepEqual(JSON.parse(readFileSync(cliReport, "utf8")), report, "report equals throughline run on the exported detections and plan");
  await screenshot(page, "9-counted-from-footage");

  // H.264 in MP4 with B-frames (frames stored out of display order), made by ffmpeg from the demo
  // at 30 frames a second: the page notices that the plan says 25 and offers the correction.
  const mp4 = join(scratch, "plaza.mp4");
  execFileSync("ffmpeg", ["-v", "error", "-y", "-i", demo("footage.webm"), "-r", "30", "-frames:v", "200", "-c:v", "libx264", "-bf", "2", "-pix_fmt", "yuv420p", "-an", mp4]);
  const mp4Status = await findInFootage(page, mp4);
  assert.match(mp4Status, /over 200 frames .*decoded in this page from the MP4 video/);
  assert.match(await page.locator("#fps-hint").innerText(), /is coded at about 30\.00 fps, not 25/);
  assert.equal(await page.getByRole("button", { name: "Use 30.00" }).isVisible(), true);
  await showView(page, "Results");
  const mp4Exported = readFileSync(await saveDownload(page, "Export detections"), "utf8");
  assert.equal(mp4Exported, detectWithFfmpeg(mp4, settings), "MP4: page's detections equal throughline detect on ffmpeg's frames");
  assert.deepEqual(seen.foreign, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("a long tracking run can be cancelled; the counts shown before, the detections and the plan are kept and Run works again", async () => {
  // Ten minutes of a busy simulated scene (15,000 frames, 30 in view) take seconds to track here.
  const dir = join(scratch, "long");
  execFileSync(cli, ["simulate", "--out-dir", dir, "--seed", "5", "--frames", "15000", "--density", "30", "--embedding-dim", "16"]);
  const { page, seen } = await openPage(`${env.server.origin}/`);
  await page.getByLabel("Open detections").setInputFiles(join(dir, "detections.csv"));
  await page.waitForFunction(() => /15000 frames/.test(document.getElementById("detections-name").textContent));
  await page.getByLabel("Open plan").setInputFiles(demo("plan.json"));
  // First counts, with a quick method: what a cancelled run must leave as they were.
  await page.getByLabel("Method").selectOption("iou");
  await runAndWait(page);
  await page.waitForSelector("#results:not([hidden])");
  const before = readFileSync(await saveDownload(page, "Export report"), "utf8");
  // Thousands of doubtful moments: the list draws them a page at a time, so the page stays quick.
  await showView(page, "Review");
  assert.equal(await page.locator("#doubtful-list li").count(), 301, "300 moments and a Show more row");
  await page.getByRole("button", { name: /^Show 300 more \(\d+ not listed yet\)$/ }).click();
  assert.equal(await page.locator("#doubtful-list li").count(), 601);
  assert.match(await page.evaluate(() => document.activeElement?.textContent || ""), /^\S+301\. /, "the keyboard goes on at the first new row");
  await showView(page, "Set up");
  await page.getByLabel("Method").selectOption("deepsort");
  await page.getByRole("button", { name: "Run", exact: true }).click();
  await page.waitForFunction(() => /Tracking… frame \d+ of 15000/.test(document.getElementById("run-status").textContent));
  // Every state the Run bar's words go through while the tracks from before come back.
  await page.evaluate(() => {
    const status = /** @type {HTMLElement} */ (document.getElementById("run-status"));
    const seen = /** @type {string[]} */ ([]);
    Object.assign(window, { statusesSeen: seen });
    new MutationObserver(() => seen.push(status.textContent || "")).observe(status, { childList: true, characterData: true, subtree: true });
  });
  await page.getByRole("button", { name: "Cancel", exact: true }).click();
  await page.waitForFunction(() => /Tracking was cancelled. The counts shown before are kept/.test(document.getElementById("messages").textContent));
  await page.waitForFunction(() => /from before the cancelled run/.test(document.getElementById("run-status").textContent), null, { timeout: 120000 });
  const statuses = await page.evaluate(() => /** @type {any} */ (window).statusesSeen);
  assert.ok(statuses.some((t) => /^Bringing back the tracks shown before: tracking again, frame \d+ of 15000…$/.test(t)), statuses.join(" | "));
  await showView(page, "Results");
  assert.equal(await page.locator("#results").isVisible(), true, "the counts shown before are still shown");
  const after = readFileSync(await saveDownload(page, "Export report"), "utf8");
  assert.equal(after, before, "the report is the one from before the cancelled run, byte for byte");
  // The new engine has the detections, the plan and the tracks: Run counts as before.
  await showView(page, "Set up");
  await page.getByLabel("Method").selectOption("sort");
  await runAndWait(page);
  await page.waitForSelector("#results:not([hidden])");
  assert.match(await page.locator("#summary").innerText(), /plaza midline/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("damaged footage: the frames before the damage are searched and kept, with a message saying so", async () => {
  const { page, seen } = await openPage(`${env.server.origin}/`);
  // The demo footage with 4 KB overwritten half-way: the WebM reader stops there (checked natively
  // in crate/footage/tests/demux.rs); the video element still opens it.
  const bytes = readFileSync(demo("footage.webm"));
  const from = Math.floor(bytes.length / 2);
  bytes.fill(0xff, from, from + 4096);
  const broken = join(scratch, "damaged.webm");
  writeFileSync(broken, bytes);
  const status = await findInFootage(page, broken);
  const frames = Number(status.match(/over (\d+) frames/)[1]);
  assert.ok(frames > 100 && frames < 750, status);
  assert.match(await page.locator("#messages").innerText(), /Reading the footage stopped early: the WebM is damaged after its last good frame.*The objects found in frames 1 to \d+ are kept/s);
  await screenshot(page, "10-damaged-footage");
  assert.deepEqual(seen.foreign, []);
  await page.close();
});

test("footage alone without WebCodecs: frames are taken by playing the footage, with a note saying so", async () => {
  const page = await env.browser.newPage();
  await page.addInitScript(() => { delete window.VideoDecoder; });
  const seen = watch(page, env.server.origin);
  await page.goto(`${env.server.origin}/`);
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  const clip = join(scratch, "short.webm");
  execFileSync("ffmpeg", ["-v", "error", "-y", "-i", demo("footage.webm"), "-frames:v", "120", "-c:v", "libvpx-vp9", "-b:v", "400k", "-an", clip]);
  await page.getByLabel("Open footage").setInputFiles(clip);
  await page.waitForFunction(() => !document.getElementById("find-objects").disabled);
  await page.getByRole("button", { name: "Find moving objects" }).click();
  await page.waitForFunction(() => /frames a second/.test(document.getElementById("find-status").textContent));
  await screenshot(page, "8-finding-objects-by-playing");
  await page.waitForFunction(() => /^Found \d+ boxes of moving objects over 120 frames/.test(document.getElementById("find-status").textContent), null, { timeout: 600000 });
  assert.doesNotMatch(await page.locator("#find-status").innerText(), /decoded in this page/);
  assert.match(await page.locator("#messages").innerText(), /taken by playing the footage, which is slower: this browser cannot decode video inside the page/);
  assert.deepEqual(seen.foreign, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
