// The WebAssembly adapter gives the same report, byte for byte, as `throughline run` on the same
// files. Run by `cargo xtask test` after building the adapter with wasm-bindgen (--target nodejs).
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, mkdtempSync, writeFileSync } from "node:fs";
import { execFileSync } from "node:child_process";
import { createRequire } from "node:module";
import { join } from "node:path";
import { tmpdir } from "node:os";

const root = new URL("../../", import.meta.url).pathname;
// Cargo's target folder: `cargo xtask test` says where (it honours CARGO_TARGET_DIR); else target/.
const targetDir = process.env.THROUGHLINE_TARGET_DIR || join(root, "target");
const require = createRequire(import.meta.url);
const { Session } = require(join(targetDir, "wasm-node/throughline_wasm.js"));
const cli = join(targetDir, "release/throughline");
const demo = (name) => join(root, "demo-site/demo", name);

for (const file of ["detections.txt", "detections.csv"]) {
  test(`report from ${file} equals the command line's`, () => {
    const session = new Session();
    const summary = session.loadDetections(readFileSync(demo(file)));
    assert.ok(summary.rows > 1000);
    session.setPlan(readFileSync(demo("plan.json"), "utf8"));
    let calls = 0;
    session.track("", "", () => calls++);
    assert.ok(calls >= 1, "progress is reported");
    const out = join(mkdtempSync(join(tmpdir(), "tl-")), "report.json");
    execFileSync(cli, ["run", demo(file), "--plan", demo("plan.json"), "-o", out, "-q"]);
    assert.equal(session.report(), readFileSync(out, "utf8"));
    const boxes = session.boxesAt(100);
    assert.equal(boxes.length % 6, 0);
    assert.ok(boxes.length > 0);
  });
}

test("errors come back as JS errors that say what to fix", () => {
  const session = new Session();
  assert.throws(() => session.loadDetections(new TextEncoder().encode("1,-1,10,20,-3,40,0.9\n")), /line 1, column 5/);
  assert.throws(() => session.setPlan('{"frame_rate": 25, "screenline": []}'), /screenline/);
  assert.throws(() => session.track("", "", undefined), /open a detections file/);
});

// The warnings about the inputs head the hand-in grid in the command line's words: the page gives
// the facts (crate/core/src/handin/said.rs words them), the command line says them as it meets them.
test("the hand-in grid's warnings from the page's facts are the command line's", () => {
  const dir = mkdtempSync(join(tmpdir(), "tl-warn-"));
  const plan = JSON.parse(readFileSync(demo("plan.json"), "utf8"));
  plan.frame_rate = 5;
  const planFile = join(dir, "plan.json");
  writeFileSync(planFile, JSON.stringify(plan));
  // One box past the footage's end: the demo's 30 s are 150 frames at the plan's 5 a second.
  const far = join(dir, "far.txt");
  writeFileSync(far, `${readFileSync(demo("detections.txt"), "utf8")}900,-1,10,10,20,40,0.9\n`);
  execFileSync(cli, ["run", far, "--plan", planFile, "--footage", demo("footage.webm"), "--site", "Warned", "--start", "2026-03-02T07:00", "-o", join(dir, "report.json"), "-q"], { stdio: "pipe" });
  const warnings = (grid) => grid.split("\n").filter((l) => l.startsWith("Warning,"));
  const said = warnings(readFileSync(join(dir, "warned_2026-03-02_grid.csv"), "utf8"));
  assert.equal(said.length, 2, said.join("\n"));

  const session = new Session();
  session.loadDetections(readFileSync(far));
  session.setPlan(JSON.stringify(plan));
  session.track("", "", () => {});
  const notes = [
    { frame_rate: { footage: "footage.webm", rate: 25, planned: 5 } },
    { past_footage: { last_frame: 900, footage_frames: 150 } },
  ];
  assert.deepEqual(warnings(session.intervalGrid("wide", "comma", { notes })), said);
  // Facts that give no cause for a warning give none.
  const fine = [{ frame_rate: { footage: "footage.webm", rate: 5, planned: 5 } }, { past_footage: { last_frame: 150, footage_frames: 150 } }];
  assert.deepEqual(warnings(session.intervalGrid("wide", "comma", { notes: fine })), []);
});
