// Changing a track's class in the page, as a person would: choose track 19 (counted as a
// pedestrian crossing the plaza midline), Class…, choose "cyclist" from the detections' classes,
// Set class. The midline's count by class moves one from pedestrians to cyclists, on screen (the
// per-interval table for one class) and in the report, which equals `throughline run --edits` with
// the same correction written by hand, byte for byte.
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser } from "./harness.mjs";
import { reviewDemo, chooseTrack, countedWith, pageReport, replay, uncorrected } from "./review-helpers.mjs";

const env = useBrowser();

/** The plaza midline's forward count of one class in the Results' interval table. */
async function midlineForward(page, cls) {
  await page.getByRole("tab", { name: "Results" }).click();
  await page.getByLabel("Class", { exact: true }).selectOption(cls);
  const rows = await page.locator("#interval-table tbody tr").evaluateAll((trs) => trs.map((r) => [...r.cells].map((c) => c.textContent)));
  await page.getByRole("tab", { name: "Review" }).click();
  return rows.filter((r) => r[0] === "plaza midline" && r[1] === "towards camera").reduce((n, r) => n + Number(r[4]), 0);
}

test("class: track 19 counted as a cyclist; the counts by class follow, as throughline run --edits gives them", async () => {
  const { page, seen } = await reviewDemo(env);
  const before = uncorrected().screenlines.find((l) => l.name === "plaza midline").by_class;
  assert.equal(await midlineForward(page, "cyclist"), before.cyclist.forward);
  await chooseTrack(page, 19);
  const box = page.locator("#tracks-correct");
  await box.getByRole("button", { name: "Change class (Tracks list)" }).click();
  const field = box.getByLabel("New class");
  assert.equal(await field.inputValue(), "pedestrian", "the form starts from the class counted");
  const offered = await page.locator("#class-choices option").evaluateAll((os) => os.map((o) => o.value));
  assert.ok(offered.includes("cyclist") && offered.includes("pedestrian"), `classes offered: ${offered}`);
  await field.fill("cyclist");
  await box.getByRole("button", { name: "Set class", exact: true }).click();
  await countedWith(page, 1);

  const got = await pageReport(page);
  assert.equal(got, replay([{ edit: "set_class", track: { id: 19, frames: [339, 750] }, class: "cyclist" }]), "equals throughline run --edits");
  const after = JSON.parse(got).screenlines.find((l) => l.name === "plaza midline").by_class;
  assert.equal(after.cyclist.forward, before.cyclist.forward + 1);
  assert.equal(after.pedestrian.forward, before.pedestrian.forward - 1);
  assert.equal(await midlineForward(page, "cyclist"), before.cyclist.forward + 1, "on screen too");
  assert.deepEqual(seen.errors, []);
  await page.close();
});
