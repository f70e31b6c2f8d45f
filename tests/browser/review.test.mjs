// Reviewing counts against the footage, as a person would: in Review, choose a count event and the
// footage goes to its frame, its track stands out, and the picture stays in view (on a laptop and on
// a phone); step to the next event; choose a track from the filtered list of tracks. The frames
// expected are the exported report's own events (the report equals `throughline run`, checked in
// app.test.mjs).
import { test } from "node:test";
import assert from "node:assert/strict";
import { mkdtempSync } from "node:fs";
import { join } from "node:path";
import { tmpdir } from "node:os";
import { useBrowser, openPage, showView, run, screenshot, inViewport, downloadText, LAPTOP, PHONE } from "./harness.mjs";

const env = useBrowser();
const scratch = mkdtempSync(join(tmpdir(), "tl-review-"));

/** Waits until the clock under the picture shows frame `f`. */
async function atFrame(page, f) {
  await page.waitForFunction((want) => document.getElementById("clock").textContent.startsWith(`frame ${want} `), f, { timeout: 10000 });
}

for (const [name, viewport] of [["laptop", LAPTOP], ["phone", PHONE]]) {
  test(`${name}: choosing a count event shows its moment with the picture in view; Next event steps on`, async () => {
    const { page, seen } = await openPage(env, { viewport });
    await run(page);
    const report = JSON.parse(await downloadText(page, "Export report", scratch));
    await showView(page, "Review");
    await page.getByRole("tab", { name: /^Events/ }).click();
    const k = 12; // far enough down the list that the list (or, on a phone, the page) must scroll to it
    const want = report.events[k];
    await page.locator("#events button").nth(k).click();
    await atFrame(page, want.frame);
    assert.ok(await inViewport(page, "#video"), "the footage is in view");
    assert.equal(await page.locator("#events button").nth(k).getAttribute("aria-current"), "true");
    const strip = await page.locator("#focus-strip").innerText();
    assert.match(strip, new RegExp(`${want.name}: ${want.kind === "screenline" ? want.label : want.direction}`));
    const labels = JSON.parse(await page.locator("#overlay").getAttribute("data-labels"));
    assert.ok(labels.some((l) => l.key === `track:${want.track_ids[0]}`), "the event's track is named on the picture");
    await screenshot(page, `14-${name}-event-chosen`, { fullPage: false });

    await page.getByRole("button", { name: "Next event" }).click();
    await atFrame(page, report.events[k + 1].frame);
    assert.equal(await page.locator("#events button").nth(k + 1).getAttribute("aria-current"), "true");
    assert.ok(await inViewport(page, "#video"), "still in view after stepping");

    // Escape lets go of the event: every track is shown alike again.
    await page.locator("#clock").click();
    await page.keyboard.press("Escape");
    await page.waitForSelector("#focus-strip", { state: "hidden" });
    assert.deepEqual(seen.errors, []);
    await page.close();
  });
}

test("tracks: the filters narrow the list; choosing a track shows its first frame", async () => {
  const { page, seen } = await openPage(env, { viewport: LAPTOP });
  await run(page);
  const tracksText = await downloadText(page, "Export tracks", scratch);
  await showView(page, "Review");
  await page.getByRole("tab", { name: /^Tracks/ }).click();
  const rows = page.locator("#track-list button");
  const all = await rows.count();
  const ids = new Set(tracksText.trim().split("\n").map((r) => Number(r.split(",")[1])));
  assert.equal(all, ids.size, "one row per track the tracker made");

  await page.getByLabel("Show class").selectOption("cyclist");
  const cyclists = await rows.allInnerTexts();
  assert.ok(cyclists.length > 0 && cyclists.length < all, `${cyclists.length} cyclists of ${all}`);
  for (const r of cyclists) assert.match(r, /cyclist/);
  await page.getByLabel("Crossed").selectOption("plaza midline");
  for (const r of await rows.allInnerTexts()) assert.match(r, /crossed .*plaza midline/);
  await page.getByLabel("Crossed").selectOption("");
  await page.getByLabel("Length").selectOption("long");
  for (const r of await rows.allInnerTexts()) assert.ok(Number(r.match(/\(([\d.]+) s\)/)[1]) >= 3, r);

  const first = rows.first();
  const [, id, from] = (await first.innerText()).match(/track (\d+)[\s\S]*frames (\d+)–/);
  await first.click();
  await atFrame(page, Number(from));
  // The tracker's own file says the track begins at that frame.
  const firstRow = tracksText.trim().split("\n").find((r) => r.split(",")[1] === id);
  assert.equal(Number(firstRow.split(",")[0]), Number(from), "the track's first frame in the exported tracks");
  assert.match(await page.locator("#focus-strip").innerText(), new RegExp(`track ${id}`));
  await screenshot(page, "14-laptop-track-chosen", { fullPage: false });
  assert.deepEqual(seen.errors, []);
  await page.close();
});
