// Speed of "Find moving objects" in the page (headless Debian Chromium, no GPU): the demo footage
// re-encoded by ffmpeg at 640x360 and 1280x720, VP9 WebM and H.264 MP4, decoded in the page with
// WebCodecs and searched by the core's motion detector in the worker. Prints frames a second from
// the page's own status line. Run by `cargo xtask bench --page` after `cargo xtask site`; a
// measurement, not a test (figures go in BENCHMARKS.md). `--only 1280x720` keeps one size;
// `--json FILE` also writes the figures there (`cargo xtask bench --goals` reads them).
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { serveSite, launch, demo } from "../browser/harness.mjs";

const scratch = mkdtempSync(join(tmpdir(), "tl-page-bench-"));
const cases = [
  ["640x360", "webm", ["-c:v", "libvpx-vp9", "-b:v", "800k", "-row-mt", "1"]],
  ["640x360", "mp4", ["-c:v", "libx264", "-pix_fmt", "yuv420p"]],
  ["1280x720", "webm", ["-c:v", "libvpx-vp9", "-b:v", "2M", "-row-mt", "1"]],
  ["1280x720", "mp4", ["-c:v", "libx264", "-pix_fmt", "yuv420p"]],
];

const option = (name) => {
  const at = process.argv.indexOf(name);
  return at > 0 ? process.argv[at + 1] : undefined;
};
const only = option("--only");
const json = option("--json");
const figures = [];

const server = await serveSite();
const browser = await launch();
try {
  const page = await browser.newPage();
  await page.goto(`${server.origin}/`);
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  console.log("size      container  frames  seconds  frames/s");
  for (const [size, ext, codec] of cases.filter(([size]) => !only || size === only)) {
    const file = join(scratch, `plaza-${size}.${ext}`);
    execFileSync("ffmpeg", ["-v", "error", "-y", "-i", demo("footage.webm"), "-vf", `scale=${size.replace("x", ":")}`, ...codec, "-an", file]);
    await page.getByLabel("Open footage").setInputFiles(file);
    await page.waitForFunction(() => !document.getElementById("find-objects").disabled);
    await page.getByRole("button", { name: "Find moving objects" }).click();
    await page.waitForFunction(() => !/^Found/.test(document.getElementById("find-status").textContent));
    await page.waitForFunction(() => /^Found/.test(document.getElementById("find-status").textContent), null, { timeout: 600000 });
    const status = await page.locator("#find-status").innerText();
    const [, frames, seconds] = status.match(/over (\d+) frames in ([\d.]+) s/);
    const how = /decoded in this page/.test(status) ? "" : " (by playing: no WebCodecs)";
    console.log(`${size.padEnd(9)} ${ext.padEnd(10)} ${frames.padStart(6)}  ${seconds.padStart(7)}  ${(frames / seconds).toFixed(0).padStart(8)}${how}`);
    figures.push({ size, container: ext, frames: Number(frames), seconds: Number(seconds), webCodecs: !how });
  }
  if (json) writeFileSync(json, JSON.stringify(figures));
} finally {
  await browser.close();
  await server.close();
}
