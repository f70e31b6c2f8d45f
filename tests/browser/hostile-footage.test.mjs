// Footage made to break a reader, opened as a person would open any file: the inputs that once
// made the container readers loop for ever or abort (crate/fuzz/regressions/, with the magic the
// fuzz targets put in front), and a movie header declaring 2^62 bytes. Each must end within
// seconds in a message naming the file, with the page still working: never "Starting…" for good.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, writeFileSync, mkdtempSync } from "node:fs";
import { execFileSync } from "node:child_process";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { useBrowser, openPage, showView, run, screenshot, demo, LAPTOP } from "./harness.mjs";

const env = useBrowser();
const scratch = mkdtempSync(join(tmpdir(), "tl-hostile-"));
const regressions = new URL("../../crate/fuzz/regressions/", import.meta.url);

const EBML = Buffer.from([0x1a, 0x45, 0xdf, 0xa3]);
const FTYP = Buffer.from([0, 0, 0, 16, ...Buffer.from("ftypisom"), 0, 0, 2, 0]);

/** The files to try: name → bytes. */
function hostileFiles() {
  const files = {
    "seek-loop.webm": Buffer.concat([EBML, readFileSync(new URL("webm/add-overflow-in-block-offset", regressions))]),
    "box-walk.mp4": Buffer.concat([FTYP, readFileSync(new URL("mp4/box-walk-for-ever", regressions))]),
  };
  const huge = Buffer.alloc(16);
  huge.writeUInt32BE(1, 0);
  huge.write("moov", 4);
  huge.writeBigUInt64BE(1n << 62n, 8);
  files["huge-moov.mp4"] = Buffer.concat([FTYP, huge]);
  return files;
}

test("footage made to break the reader ends in a message within seconds, and the page goes on working", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  for (const [name, bytes] of Object.entries(hostileFiles())) {
    const path = join(scratch, name);
    writeFileSync(path, bytes);
    await showView(page, "Set up");
    const started = Date.now();
    await page.getByLabel("Open footage").setInputFiles(path);
    // Waited for in full: seek-loop.webm starts to play (the page says it set the demo aside,
    // naming it) before the browser gives up on it.
    await page.waitForFunction(
      (n) => document.getElementById("messages").textContent.includes(`cannot play ${n}`),
      name,
      { timeout: 15000 },
    );
    const said = await page.locator("#messages").innerText();
    assert.match(said, new RegExp(`cannot play ${name.replace(".", "\\.")}`), said);
    assert.ok(Date.now() - started < 15000);
    assert.doesNotMatch(await page.locator("#find-status").innerText(), /Starting/);
  }
  await screenshot(page, "16-hostile-footage", { fullPage: false });
  // The page still counts. (The one that plays, seek-loop.webm, set the demo's detections and
  // plan aside as any footage of the person's own does: own-footage.test.mjs.)
  await page.getByLabel("Open detections").setInputFiles(demo("detections.csv"));
  await page.getByLabel("Open plan").setInputFiles(demo("plan.json"));
  await page.waitForFunction(() => /detections\.csv/.test(document.getElementById("detections-name").textContent));
  await run(page);
  await showView(page, "Results");
  assert.match(await page.locator("#summary").innerText(), /plaza midline/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("a WebM whose index points at itself, which browsers play, is read whole", async () => {
  // The demo footage with the seek head's entries for the segment information and the track list
  // pointed back at the seek head itself (Matroska, RFC 9559: SeekPosition is relative to the
  // segment's data). Browsers play it; a reader that follows the index goes round for ever.
  const bytes = readFileSync(demo("footage.webm"));
  const head = bytes.indexOf(Buffer.from([0x11, 0x4d, 0x9b, 0x74]));
  const segmentData = bytes.indexOf(Buffer.from([0x18, 0x53, 0x80, 0x67])) + 12;
  assert.equal(head, segmentData, "the seek head opens the segment");
  let pointed = 0;
  for (const id of [[0x15, 0x49, 0xa9, 0x66], [0x16, 0x54, 0xae, 0x6b]]) {
    const entry = bytes.indexOf(Buffer.from([0x53, 0xab, 0x84, ...id]), head);
    const position = entry + 7;
    assert.deepEqual([...bytes.subarray(position, position + 2)], [0x53, 0xac]);
    const length = bytes[position + 2] & 0x7f;
    bytes.fill(0, position + 3, position + 3 + length);
    pointed += 1;
  }
  assert.equal(pointed, 2);
  const path = join(scratch, "seek-to-itself.webm");
  writeFileSync(path, bytes);
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await showView(page, "Set up");
  await page.getByLabel("Open footage").setInputFiles(path);
  await page.waitForFunction(() => !document.getElementById("find-objects").disabled);
  await page.getByLabel("Open plan").setInputFiles(demo("plan.json"));
  await page.getByLabel("Height at top edge (px)").fill("34");
  await page.getByLabel("Height at bottom edge (px)").fill("91");
  await page.getByRole("button", { name: "Find moving objects" }).click();
  await page.waitForFunction(() => /^Found \d+ boxes of moving objects/.test(document.getElementById("find-status").textContent), null, { timeout: 600000 });
  assert.match(await page.locator("#find-status").innerText(), /over 750 frames .*decoded in this page from the WebM video/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("sound without a picture is named as such, and the page goes on working", async () => {
  // A WebM holding only an Opus tone (ffmpeg's sine source): browsers play it, with no picture to
  // draw on. Once this crashed the page's tab.
  const tone = join(scratch, "tone.webm");
  execFileSync("ffmpeg", ["-v", "error", "-y", "-f", "lavfi", "-i", "sine=frequency=440:duration=2", "-c:a", "libopus", tone]);
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  let crashed = false;
  page.on("crash", () => { crashed = true; });
  await showView(page, "Set up");
  await page.getByLabel("Open footage").setInputFiles(tone);
  await page.waitForFunction(() => document.getElementById("messages").textContent.includes("tone.webm"), null, { timeout: 15000 });
  assert.match(await page.locator("#messages").innerText(), /tone\.webm has no picture \(sound only\?\): open the video itself/);
  await run(page);
  await showView(page, "Results");
  assert.match(await page.locator("#summary").innerText(), /plaza midline/);
  assert.equal(crashed, false);
  assert.deepEqual(seen.errors, []);
  await page.close();
});


// A copy that stopped half-way: the browser plays it to its cut, showing the length its header
// declares; the container says it is cut short (a newcomer's trial: nothing said until Find).
test("footage cut short is said to be so as it opens", async () => {
  const { page } = await openPage(env, { viewport: LAPTOP });
  const whole = readFileSync(demo("footage.webm"));
  const path = join(scratch, "copied-half.webm");
  writeFileSync(path, whole.subarray(0, whole.length >> 1));
  await page.getByLabel("Open footage").setInputFiles(path);
  await page.waitForFunction(() => /seems cut short/.test(document.getElementById("messages").textContent), null, { timeout: 15000 });
  assert.match(
    await page.locator("#messages").innerText(),
    /copied-half\.webm seems cut short \(an interrupted copy\?\): it says it is 1\.1 MB long, but the file holds 0\.6 MB \(about 50% of it\)\. Counts stop where its frames stop, though the player shows its whole length \(0:30\.00\)\./,
  );
  // The whole file after it: nothing said, and what was said of the cut one is gone.
  const copy = join(scratch, "copied-whole.webm");
  writeFileSync(copy, whole);
  await page.getByLabel("Open footage").setInputFiles(copy);
  await page.waitForFunction(() => /copied-whole\.webm/.test(document.getElementById("footage-name").textContent));
  await page.waitForFunction(() => !/seems cut short/.test(document.getElementById("messages").textContent));
});

// A camera that turns (the demo's plaza through a window ffmpeg pans across it, VP9 as a phone's
// browser records): Find says where the camera moves and that those boxes are not objects, in
// the core's words, as `throughline detect` says them (crate/cli/tests/video.rs).
test("footage from a camera that turns is said to move when objects are found in it", async () => {
  const pan = join(scratch, "turning.webm");
  execFileSync("ffmpeg", ["-v", "error", "-y", "-i", demo("footage.webm"), "-t", "6", "-vf", "scale=1280:720,crop=640:360:'100*min(max(t-1,0),4)':180", "-c:v", "libvpx-vp9", "-deadline", "realtime", "-b:v", "1M", pan]);
  const { page } = await openPage(env, { viewport: LAPTOP });
  await page.getByLabel("Open footage").setInputFiles(pan);
  await page.waitForFunction(() => !document.getElementById("find-objects").disabled);
  await page.getByRole("button", { name: "Find moving objects" }).click();
  await page.waitForFunction(() => /^Found \d+ boxes of moving objects/.test(document.getElementById("find-status").textContent), null, { timeout: 600000 });
  assert.match(await page.locator("#messages").innerText(), /turning\.webm: the camera seems to move \(pan, shake or be carried\) in about \d+% of the footage, between frames \d+ and \d+\. The fixed-camera detector needs a camera that keeps still/);
  await page.close();
});
