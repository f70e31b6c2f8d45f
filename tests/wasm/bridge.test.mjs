// Bridging missed detections through the WebAssembly adapter (Session.startBridging, FootageBridge)
// gives the report of `throughline run DETECTIONS --y4m FRAMES` with the same settings, byte for
// byte: footage rendered by our own simulator, its luma planes fed frame by frame as the page feeds
// decoded frames. Run by `cargo xtask test` after building the adapter for Node.
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, writeFileSync, mkdtempSync } from "node:fs";
import { execFileSync, spawnSync } from "node:child_process";
import { createRequire } from "node:module";
import { join } from "node:path";
import { tmpdir } from "node:os";

const root = new URL("../../", import.meta.url).pathname;
const targetDir = process.env.THROUGHLINE_TARGET_DIR || join(root, "target");
const require = createRequire(import.meta.url);
const { Session } = require(join(targetDir, "wasm-node/throughline_wasm.js"));
const cli = join(targetDir, "release/throughline");

/**
 * The luma planes of a YUV4MPEG2 file with 4:2:0 frames (the layout as Debian's ffmpeg and our
 * simulator write it: a header line, then "FRAME" lines each followed by the frame's planes).
 */
function lumaPlanes(bytes) {
  const line = (at) => bytes.indexOf(0x0a, at);
  const header = bytes.subarray(0, line(0)).toString("latin1");
  const width = Number(/ W(\d+)/.exec(header)[1]);
  const height = Number(/ H(\d+)/.exec(header)[1]);
  const frameBytes = width * height + 2 * Math.ceil(width / 2) * Math.ceil(height / 2);
  const planes = [];
  for (let at = line(0) + 1; at < bytes.length; ) {
    const start = line(at) + 1;
    planes.push(bytes.subarray(start, start + width * height));
    at = start + frameBytes;
  }
  return { width, height, planes };
}

test("footage fed to the adapter bridges as throughline run --y4m does", () => {
  const dir = mkdtempSync(join(tmpdir(), "tl-bridge-"));
  const frames = join(dir, "frames.y4m");
  // Three boxes in ten missed, tracked by the IoU tracker (a 2-frame gap at most): many tracks break
  // where the footage still shows the person (the scene of crate/cli/tests/bridge.rs).
  execFileSync(cli, ["simulate", "--out-dir", dir, "--seed", "5", "--frames", "150", "--density", "6", "--miss-rate", "0.3",
    "--false-positives", "0", "--width", "320", "--height", "180", "--render", frames]);
  const plan = '{ "frame_rate": 25, "screenlines": [ { "name": "mid", "points": [[0, 110], [320, 110]] } ] }';
  writeFileSync(join(dir, "plan.json"), plan);
  const settings = '{"bridge_frames": 25}';
  writeFileSync(join(dir, "on.json"), settings);
  const out = join(dir, "report.json");
  execFileSync(cli, ["run", join(dir, "detections.txt"), "--method", "iou", "--y4m", frames, "--config", join(dir, "on.json"),
    "--plan", join(dir, "plan.json"), "-o", out, "-q"]);

  const session = new Session();
  session.loadDetections(readFileSync(join(dir, "detections.txt")));
  session.setPlan(plan);
  session.track("iou", settings, undefined);
  const unbridged = session.report();
  const { width, height, planes } = lumaPlanes(readFileSync(frames));
  const bridge = session.startBridging(width, height);
  const last = bridge.lastFrameNeeded();
  assert.ok(last > 0 && last <= planes.length, `gaps need frames 1 to ${last}`);
  for (let f = 1; f <= last; f++) bridge.feed(f, planes[f - 1]);
  const summary = bridge.finish(session);
  assert.ok(summary.joined >= 1, `at least one gap bridged: ${JSON.stringify(summary)}`);
  assert.ok(summary.met >= summary.joined && summary.followed >= summary.met);
  assert.notEqual(session.report(), unbridged);
  assert.equal(session.report(), readFileSync(out, "utf8"), "report equals throughline run --y4m");
});

test("without bridging settings there is no handle; a handle of older tracks is refused", () => {
  const dir = mkdtempSync(join(tmpdir(), "tl-bridge-"));
  execFileSync(cli, ["simulate", "--out-dir", dir, "--seed", "2", "--frames", "40", "--density", "4"]);
  const session = new Session();
  session.loadDetections(readFileSync(join(dir, "detections.txt")));
  assert.throws(() => session.startBridging(320, 180), /run tracking first/);
  session.track("", "", undefined);
  assert.equal(session.startBridging(320, 180), undefined);
  session.track("", '{"bridge_frames": 10}', undefined);
  // Footage with no picture (an audio-only file) or too large a one: what to open instead.
  assert.throws(() => session.startBridging(0, 180), /footage of 0x180 pixels: open footage with a picture of 1 to 8192 pixels a side/);
  assert.throws(() => session.startBridging(320, 8193), /320x8193 pixels: open footage with a picture of 1 to 8192/);
  const old = session.startBridging(320, 180);
  session.track("", '{"bridge_frames": 10}', undefined);
  assert.throws(() => old.finish(session), /run tracking again/);
});

test("without footage to bridge with, the report says nothing was bridged, as the command line's does", () => {
  // `throughline run` without --y4m and the page's worker with no footage open both call the
  // core's not_bridged: the same report, which names no bridging; the command line adds a note.
  const dir = mkdtempSync(join(tmpdir(), "tl-nobridge-"));
  execFileSync(cli, ["simulate", "--out-dir", dir, "--seed", "3", "--frames", "60", "--density", "4",
    "--width", "320", "--height", "180"]);
  const plan = '{ "frame_rate": 25, "screenlines": [ { "name": "mid", "points": [[0, 110], [320, 110]] } ] }';
  writeFileSync(join(dir, "plan.json"), plan);
  const settings = '{"bridge_frames": 10}';
  writeFileSync(join(dir, "on.json"), settings);
  const out = join(dir, "report.json");
  const run = spawnSync(cli, ["run", join(dir, "detections.txt"), "--config", join(dir, "on.json"),
    "--plan", join(dir, "plan.json"), "-o", out], { encoding: "utf8" });
  assert.equal(run.status, 0, run.stderr);
  assert.match(run.stderr, /bridge gaps of up to 10 frames, which follows objects in the footage: give it with --y4m FILE; nothing was bridged/);
  const session = new Session();
  session.loadDetections(readFileSync(join(dir, "detections.txt")));
  session.setPlan(plan);
  session.track("", settings, undefined);
  assert.equal(JSON.parse(session.report()).tracker.bridge_frames, 10);
  assert.equal(session.notBridged(), 10);
  assert.equal(session.notBridged(), 0);
  assert.equal(session.startBridging(320, 180), undefined);
  const report = session.report();
  assert.equal(report, readFileSync(out, "utf8"), "report equals throughline run without --y4m");
  assert.equal(JSON.parse(report).tracker.bridge_frames, undefined);
});
