// The page's layout on a laptop (1366 × 768) and a phone (390 × 844), as a person first sees it and
// after counting: on the laptop Run and the whole picture are in view without scrolling, and the
// picture keeps a useful size, and a view chosen opens at its top; on the phone nothing scrolls
// sideways, whichever view is shown.
// Screenshots of each go to the artefacts folder (target/browser-artefacts/).
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser, openPage, showView, run, screenshot, inViewport, LAPTOP, PHONE } from "./harness.mjs";

const env = useBrowser();

test("laptop: Run and the whole picture are in view without scrolling, and stay so while reviewing", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  assert.equal(await page.evaluate(() => scrollY), 0);
  assert.ok(await inViewport(page, "#run"), "Run is within the window");
  assert.ok(await inViewport(page, "#stage"), "the picture is within the window");
  const stage = await page.locator("#stage").boundingBox();
  // A picture less than half the window's width would be too small to check counts on.
  assert.ok(stage.width >= LAPTOP.width / 2, `picture ${stage.width} px wide`);
  await screenshot(page, "12-laptop-set-up", { fullPage: false });

  // Run pressed from far down Set up (a newcomer's trial: Results opened 576 px past its totals).
  await page.mouse.wheel(0, 1200);
  await page.waitForFunction(() => scrollY > 0);
  await run(page);
  assert.equal(await page.getByRole("tab", { name: "Results" }).getAttribute("aria-selected"), "true", "Run leads on to the results");
  await page.waitForFunction(() => document.getElementById("mode-results").getBoundingClientRect().top >= 0);
  assert.ok(await inViewport(page, "#results h2"), "the results open at their totals");
  await screenshot(page, "12-laptop-results", { fullPage: false });
  // Scrolling down through the results leaves the picture where it is.
  await page.mouse.wheel(0, 1500);
  await page.waitForFunction(() => scrollY > 0);
  assert.ok(await inViewport(page, "#stage"), "the picture stays in view as the results scroll");
  await screenshot(page, "12-laptop-results-scrolled", { fullPage: false });

  await showView(page, "Review");
  assert.ok(await inViewport(page, "#stage"));
  assert.ok(await inViewport(page, "#run"), "Run stays within reach while reviewing");
  // The review's five tabs, their counts shown, sit on one row (a newcomer's trial: "Hand count"
  // wrapped onto a row of its own).
  const tops = await page.locator("#view-review .tabs [role=tab]").evaluateAll((tabs) => tabs.map((t) => Math.round(t.getBoundingClientRect().top)));
  assert.equal(tops.length, 5);
  assert.equal(new Set(tops).size, 1, `the review's tabs start at ${tops.join(", ")} px`);
  await screenshot(page, "12-laptop-review", { fullPage: false });
  // A doubtful moment's strip under the picture, then a message: both in the window, the picture
  // made room for them (a newcomer's trial: a message about a file sat below the window).
  await page.keyboard.press("n");
  await page.waitForSelector("#focus-strip:not([hidden])");
  await page.getByLabel("Open detections").setInputFiles({ name: "boxes.csv", mimeType: "text/csv", buffer: Buffer.from("frame,x,y\nnot,a,box\n") });
  await page.waitForSelector("#messages .message");
  assert.ok(await inViewport(page, "#focus-strip"), "the strip is in the window");
  const message = await page.locator("#messages").boundingBox();
  assert.ok(message.y + Math.min(message.height, 40) <= LAPTOP.height, `the message's first lines in the window (top ${message.y})`);
  assert.ok((await page.locator("#stage").boundingBox()).width >= LAPTOP.width / 2, "the picture still half the window wide");
  await screenshot(page, "12-laptop-review-message", { fullPage: false });
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("phone: nothing scrolls sideways in any view, and results fit or scroll inside their own box", async () => {
  const { page, seen } = await openPage(env, { viewport: PHONE });
  /** The page is no wider than the window. */
  const fits = () => page.evaluate(() => [document.documentElement.scrollWidth, innerWidth]);
  let [scroll, width] = await fits();
  assert.ok(scroll <= width, `set up: page ${scroll} px wide in a ${width} px window`);
  await screenshot(page, "13-phone-set-up");
  await page.getByText("Add by typing coordinates").click();
  [scroll, width] = await fits();
  assert.ok(scroll <= width, `typing coordinates: page ${scroll} px wide`);

  await run(page);
  for (const view of ["Results", "Review"]) {
    await showView(page, view);
    [scroll, width] = await fits();
    assert.ok(scroll <= width, `${view}: page ${scroll} px wide in a ${width} px window`);
    // While reviewing the picture sticks to the top: a whole-page picture would misplace it.
    await screenshot(page, `13-phone-${view.toLowerCase()}`, { fullPage: view !== "Review" });
  }
  // No keyboard on a phone: the review's help says what to do without naming keys.
  const help = await page.locator("#list-doubtful .hint").first().innerText();
  assert.doesNotMatch(help, /\bCtrl\b|\bN next\b/, help);
  assert.match(help, /then accept it .* or reject it/, help);
  await page.getByRole("tab", { name: "Tracks" }).click();
  [scroll, width] = await fits();
  assert.ok(scroll <= width, `tracks: page ${scroll} px wide`);
  // Every table is inside the window; a wide one scrolls within its own box.
  await showView(page, "Results");
  const tables = await page.locator("#results .table-box").evaluateAll((boxes) => boxes.map((b) => {
    const r = b.getBoundingClientRect();
    return { right: r.right, scrolls: getComputedStyle(b).overflowX };
  }));
  assert.ok(tables.length >= 4, `${tables.length} tables`);
  for (const t of tables) {
    assert.ok(t.right <= PHONE.width, `a table box reaches x = ${t.right}`);
    assert.equal(t.scrolls, "auto");
  }
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test("keyboard: the arrow keys move along the tabs (and do not step the footage)", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await page.getByRole("tab", { name: "Set up" }).focus();
  await page.keyboard.press("ArrowRight");
  assert.equal(await page.getByRole("tab", { name: "Review" }).getAttribute("aria-selected"), "true");
  assert.equal(await page.evaluate(() => document.activeElement.id), "mode-review");
  await page.keyboard.press("End");
  assert.equal(await page.getByRole("tab", { name: "Results" }).getAttribute("aria-selected"), "true");
  await page.keyboard.press("ArrowRight"); // round to the first
  assert.equal(await page.getByRole("tab", { name: "Set up" }).getAttribute("aria-selected"), "true");
  assert.match(await page.locator("#clock").innerText(), /^frame 1 /, "no frame was stepped");
  assert.deepEqual(seen.errors, []);
  await page.close();
});
