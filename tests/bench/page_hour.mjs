// Speed of the page on a long file of detections (headless Debian Chromium, no GPU): the file and a
// plan opened as a person opens them, Run pressed, and the time until the counts are on screen,
// stage by stage, with what the progress bar showed on the way. Then the core alone in the same
// browser: the adapter's Session reading the same bytes and tracking them with `sort`, for the
// comparison with the same calls natively. Run by `cargo xtask bench --goals` (crate/xtask/src/
// bench/page_hour.rs) after `cargo xtask site`; a measurement, not a test.
//
//   node tests/bench/page_hour.mjs DETECTIONS PLAN [RUNS]
//
// Prints one JSON object (seconds): {load, track, count, total, progress: {...}, core: {...}}.
import { readFileSync } from "node:fs";
import { basename } from "node:path";
import { serveSite, launch } from "../browser/harness.mjs";

const [detections, plan, runsArg] = process.argv.slice(2);
if (!detections || !plan) throw new Error("usage: node tests/bench/page_hour.mjs DETECTIONS PLAN [RUNS]");
const runs = Number(runsArg || 3);

const server = await serveSite();
const browser = await launch();
try {
  const whole = await inThePage(browser, server.origin);
  const core = await coreAlone(browser, server.origin);
  console.log(JSON.stringify({ ...whole, core }));
} finally {
  await browser.close();
  await server.close();
}

/**
 * Opens the plan, then the detections, presses Run and waits for the counts: the seconds of each
 * stage as the person sees them (polling when the page is free to draw), and the progress bar
 * sampled every 50 ms by a timer of the page (a long gap between samples is the page frozen).
 */
async function inThePage(browser, origin) {
  const page = await browser.newPage();
  await page.goto(`${origin}/`);
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  await page.getByLabel("Open plan").setInputFiles(plan);
  await page.waitForFunction((name) => document.getElementById("plan-name").textContent.includes(name), basename(plan));
  await page.evaluate(() => {
    const w = /** @type {any} */ (window);
    w.benchSamples = [];
    const bar = /** @type {HTMLProgressElement} */ (document.getElementById("progress"));
    const status = document.getElementById("run-status");
    const readBar = document.getElementById("detections-progress");
    w.benchTimer = setInterval(() => w.benchSamples.push({
      t: performance.now(), bar: bar.hidden ? null : bar.value, status: status.textContent, reading: !readBar.hidden,
    }), 50);
  });
  // The demo opens with the page: its detections' name is there before, its counts may be too.
  const before = await page.locator("#detections-name").textContent();
  const t0 = await page.evaluate(() => performance.now());
  await page.getByLabel("Open detections").setInputFiles(detections);
  await page.waitForFunction((before) => {
    const name = document.getElementById("detections-name").textContent;
    return name !== before && / boxes, \d+ frames/.test(name);
  }, before, { timeout: 600000, polling: 20 });
  const t1 = await page.evaluate(() => {
    const w = /** @type {any} */ (window);
    w.benchCounted = false;
    new MutationObserver(() => { w.benchCounted = true; }).observe(document.getElementById("results"), { childList: true, subtree: true });
    return performance.now();
  });
  await page.getByRole("button", { name: "Run", exact: true }).click();
  await page.waitForFunction(() => /tracks in/.test(document.getElementById("run-status").textContent), null, { timeout: 600000, polling: 20 });
  const t2 = await page.evaluate(() => performance.now());
  await page.waitForFunction(() => /** @type {any} */ (window).benchCounted && !document.getElementById("results").hidden, null, { timeout: 600000, polling: 20 });
  // Two frames drawn after the counts: everything the page does on new counts is done.
  const t3 = await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(() => r(performance.now())))));
  const samples = await page.evaluate(() => { const w = /** @type {any} */ (window); clearInterval(w.benchTimer); return w.benchSamples; });
  await page.close();
  return { load: (t1 - t0) / 1000, track: (t2 - t1) / 1000, count: (t3 - t2) / 1000, total: (t3 - t0) / 1000, progress: progressSeen(samples, t0, t3) };
}

/**
 * What the samples say: how often the reading bar was seen, the tracking bar's values, and the
 * longest the page froze.
 */
function progressSeen(samples, from, to) {
  const bars = samples.filter((s) => s.bar !== null).map((s) => s.bar);
  let frozen = 0;
  let last = from;
  for (const s of samples) {
    frozen = Math.max(frozen, s.t - last);
    last = s.t;
  }
  frozen = Math.max(frozen, to - last);
  const distinct = [...new Set(bars.map((b) => b.toFixed(2)))];
  const reading = samples.filter((s) => s.reading).length;
  return { barShown: bars.length, barValues: distinct.length, barMax: bars.length ? Math.max(...bars) : 0, readingShown: reading, longestFrozen: frozen / 1000 };
}

/**
 * The core alone in this browser: wasm-bindgen's glue loaded into a page of the site, a Session
 * reading the detections' bytes (`loadDetections`) and tracking them (`track("sort")`, no plan, no
 * progress callback), timed around each call; the first run, and the least of `runs` after it.
 */
async function coreAlone(browser, origin) {
  const page = await adapterPage(browser, origin);
  const times = await page.evaluate(async (runs) => {
    // The glue's `let wasm_bindgen` is a global of the page's scripts, not a property of window.
    const bindgen = (0, eval)("wasm_bindgen");
    await bindgen({ module_or_path: "pkg/throughline_wasm_bg.wasm" });
    const input = /** @type {HTMLInputElement} */ (document.getElementById("bench-file"));
    const bytes = new Uint8Array(await input.files[0].arrayBuffer());
    const out = [];
    for (let i = 0; i <= runs; i++) {
      const s = new bindgen.Session();
      const a = performance.now();
      s.loadDetections(bytes);
      const b = performance.now();
      s.track("sort", "", null);
      const c = performance.now();
      s.free();
      out.push({ read: (b - a) / 1000, track: (c - b) / 1000 });
    }
    return out;
  }, runs);
  await page.close();
  return { ...timesOf(times), stages: await stagesAlone(browser, origin) };
}

/** @param {{read: number, track: number}[]} times */
function timesOf(times) {
  const later = times.slice(1);
  return {
    firstRead: times[0].read,
    firstTrack: times[0].track,
    read: Math.min(...later.map((t) => t.read)),
    track: Math.min(...later.map((t) => t.track)),
  };
}

/** Opens a page of the site with the adapter's glue loaded and the detections in a file input. */
async function adapterPage(browser, origin) {
  const page = await browser.newPage();
  page.on("crash", () => console.error("the page crashed"));
  await page.goto(`${origin}/`);
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  await page.addScriptTag({ url: "pkg/throughline_wasm.js" });
  await page.evaluate(() => {
    const input = document.createElement("input");
    input.type = "file";
    input.id = "bench-file";
    document.body.append(input);
  });
  await page.setInputFiles("#bench-file", detections);
  return page;
}

/**
 * Each call the page's worker makes from opening the file to the counts on screen, timed alone
 * on a Session of its own: where the time of the page goes, stage by stage.
 */
async function stagesAlone(browser, origin) {
  const page = await adapterPage(browser, origin);
  const stages = await page.evaluate(async (planText) => {
    const bindgen = (0, eval)("wasm_bindgen");
    await bindgen({ module_or_path: "pkg/throughline_wasm_bg.wasm" });
    const input = /** @type {HTMLInputElement} */ (document.getElementById("bench-file"));
    const s = new bindgen.Session();
    /** @type {Record<string, number>} */
    const took = {};
    const time = (name, work) => { const a = performance.now(); const v = work(); took[name] = (performance.now() - a) / 1000; return v; };
    const bytes = new Uint8Array(await input.files[0].arrayBuffer());
    time("loadDetections", () => s.loadDetections(bytes));
    time("setPlan (no tracks)", () => s.setPlan(planText));
    time("track (with plan: counts too)", () => s.track("sort", "", null));
    time("allBoxes", () => s.allBoxes());
    time("trackList", () => s.trackList());
    time("setPlan (counts again)", () => s.setPlan(planText));
    const report = time("report", () => s.report());
    time("countsCsv", () => s.countsCsv());
    time("doubts", () => s.doubts(640, 360));
    took["report bytes"] = report.length;
    s.free();
    return took;
  }, readFileSync(plan, "utf8"));
  await page.close();
  return stages;
}
