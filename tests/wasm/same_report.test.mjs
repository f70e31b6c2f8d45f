// The WebAssembly adapter gives the same report, byte for byte, as `throughline run` on the same
// files. Run by `cargo xtask test` after building the adapter with wasm-bindgen (--target nodejs).
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync, mkdtempSync } from "node:fs";
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
