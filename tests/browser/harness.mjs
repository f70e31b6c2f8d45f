// Shared set-up for the browser checks: the project's own server for demo-site/ on 127.0.0.1, and
// Debian's Chromium driven by playwright-core (no browser download).
import { spawn } from "node:child_process";
import { mkdtemp, mkdir } from "node:fs/promises";
import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { chromium } from "playwright-core";
import { before, after } from "node:test";

export const root = new URL("../../", import.meta.url).pathname;
export const site = join(root, "demo-site");
export const demo = (name) => join(site, "demo", name);
/** Cargo's target folder: `cargo xtask test` says where (it honours CARGO_TARGET_DIR); else target/. */
export const targetDir = process.env.THROUGHLINE_TARGET_DIR || join(root, "target");
export const artefacts = join(targetDir, "browser-artefacts");

/**
 * Serves demo-site/ with the project's own server (`cargo xtask serve`, already built by `cargo
 * xtask site` or `test`) on a free port of 127.0.0.1, so the page runs with the headers a user gets
 * (its Content-Security-Policy among them). Resolves to {origin, close}.
 */
export async function serveSite() {
  const xtask = join(targetDir, "debug/xtask");
  if (!existsSync(xtask)) throw new Error("build the site first: cargo xtask site (or run cargo xtask test)");
  const child = spawn(xtask, ["serve", "--no-build", "--port", "0"], { cwd: root, stdio: ["ignore", "pipe", "inherit"] });
  const origin = await new Promise((resolve, reject) => {
    let seen = "";
    child.stdout.on("data", (chunk) => {
      seen += chunk;
      const m = seen.match(/http:\/\/127\.0\.0\.1:\d+/);
      if (m) resolve(m[0]);
    });
    child.on("exit", (code) => reject(new Error(`cargo xtask serve stopped (${code}): ${seen}`)));
  });
  return { origin, close: () => new Promise((r) => { child.once("exit", r); child.kill(); }) };
}

/** Debian's Chromium, headless, in a fresh profile; downloads allowed. */
export async function launch() {
  const executablePath = ["/usr/bin/chromium", "/usr/bin/chromium-browser"].find(existsSync);
  if (!executablePath) throw new Error("install Debian's chromium (apt-get install -y chromium): cargo xtask test does");
  const profile = await mkdtemp(join(tmpdir(), "tl-chromium-"));
  await mkdir(artefacts, { recursive: true });
  return chromium.launchPersistentContext(profile, {
    executablePath,
    headless: true,
    acceptDownloads: true,
    viewport: { width: 1400, height: 1000 },
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
      "--disable-component-update", "--disable-sync", "--autoplay-policy=no-user-gesture-required"],
  });
}

/**
 * Every request the page makes, and every console error it prints. A request that leaves the
 * page's own origin (other than blob: and data: URLs it made itself) is a failure of the privacy promise.
 */
export function watch(page, origin) {
  const seen = { requests: [], foreign: [], errors: [] };
  page.on("request", (r) => {
    const url = r.url();
    seen.requests.push(url);
    const own = url.startsWith(`${origin}/`) || url.startsWith("blob:") || url.startsWith("data:") || (origin === "file://" && url.startsWith("file://"));
    if (!own) seen.foreign.push(url);
  });
  page.on("console", (m) => { if (m.type() === "error") seen.errors.push(m.text()); });
  page.on("pageerror", (e) => seen.errors.push(String(e)));
  return seen;
}

/** Saves the whole page (or, with `fullPage` false, what the window shows) as artefacts/NAME.png. */
export async function screenshot(page, name, { fullPage = true } = {}) {
  await page.screenshot({ path: join(artefacts, `${name}.png`), fullPage });
}

/** The two screens every layout is checked on: a common laptop and a common phone. */
export const LAPTOP = { width: 1366, height: 768 };
export const PHONE = { width: 390, height: 844 };

/**
 * A new tab of the browser at `viewport`, on the page (by default the served site), once the page
 * says it is ready. Resolves to {page, seen} (seen: from `watch`).
 */
export async function openPage(env, { viewport = null, url = `${env.server.origin}/` } = {}) {
  const page = await env.browser.newPage();
  if (viewport) await page.setViewportSize(viewport);
  const seen = watch(page, url.startsWith("file:") ? "file://" : env.server.origin);
  await page.goto(url);
  await page.waitForSelector("body[data-ready=true]", { timeout: 30000 });
  await onTheDemo(page);
  await page.waitForFunction(() => document.getElementById("overlay").width === 640);
  return { page, seen };
}

/**
 * A plan of the person's own kept by an earlier test in this browser: the page goes on with it and
 * waits for their files; tests that begin on the demo open it, as a person would choose it.
 * @param {import("playwright-core").Page} page
 */
export async function onTheDemo(page) {
  const demoButton = page.getByRole("button", { name: "Open the demo" });
  if (await demoButton.count()) await demoButton.click();
}

/** Chooses what the page shows beside the footage, as a person would: "Set up", "Review" or "Results". */
export async function showView(page, name) {
  await page.getByRole("tab", { name }).click();
}

/** Presses Run and waits until the tracks are counted. */
export async function run(page) {
  await page.getByRole("button", { name: "Run", exact: true }).click();
  await page.waitForFunction(() => /tracks in/.test(document.getElementById("run-status").textContent), null, { timeout: 60000 });
  await page.waitForSelector("#results:not([hidden])", { state: "attached" });
}

/** Clicks the picture at a point given in video pixels. */
export async function clickPicture(page, x, y) {
  const canvas = page.locator("#overlay");
  const box = await canvas.boundingBox();
  const [w, h] = await canvas.evaluate((c) => [c.width, c.height]);
  await canvas.click({ position: { x: (x * box.width) / w, y: (y * box.height) / h } });
}

/** Offers a download by pressing the button named `buttonName`; resolves to the file's text. */
export async function downloadText(page, buttonName, dir) {
  const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: buttonName, exact: true }).click()]);
  const path = join(dir, download.suggestedFilename());
  await download.saveAs(path);
  return readFileSync(path, "utf8");
}

/** Whether the element's box lies wholly inside the window as it is scrolled now. */
export async function inViewport(page, selector) {
  return page.locator(selector).evaluate((el) => {
    const r = el.getBoundingClientRect();
    return r.width > 0 && r.top >= 0 && r.left >= 0 && r.bottom <= innerHeight && r.right <= innerWidth;
  });
}

/**
 * For a test file: a server and a browser started before its tests and stopped after them.
 * Returns an object whose `server` and `browser` are set once they are up.
 */
export function useBrowser() {
  const env = { server: null, browser: null };
  before(async () => {
    env.server = await serveSite();
    env.browser = await launch();
  });
  after(async () => {
    await env.browser.close();
    await env.server.close();
  });
  return env;
}
