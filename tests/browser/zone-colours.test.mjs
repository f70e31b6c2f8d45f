// A zone keeps its colour when others are added or deleted: colours belong to the zone (kept by its
// name), not to its place in the list. Two zones are added by typing their corners; deleting the
// first must leave the second's colour as it was (and so must renaming it).
import { test } from "node:test";
import assert from "node:assert/strict";
import { useBrowser, openPage, demo } from "./harness.mjs";

const env = useBrowser();

/** Each zone's name and the colour of its stripe in the Zones list. */
async function zoneColours(page) {
  return page.locator("#zone-list li:not(.hint)").evaluateAll((items) => items.map((li) => [li.querySelector("input").value, li.style.getPropertyValue("--swatch")]));
}

/** Adds a zone by typing its corners. */
async function addZone(page, corners) {
  await page.locator("#coords-kind").selectOption("zone");
  await page.getByLabel("Points (x, y in picture pixels)").fill(corners);
  await page.getByLabel("Points (x, y in picture pixels)").press("Enter");
}

test("a zone keeps its colour when another zone is added or deleted", async () => {
  const { page, seen } = await openPage(env);
  await page.getByLabel("Open plan").setInputFiles(demo("plan.json"));
  await page.waitForFunction(() => document.querySelector("[aria-label='Name of zone 1']")?.value === "kiosk");
  await page.getByText("Add by typing coordinates").click();
  await addZone(page, "400, 260; 600, 260; 600, 340");
  await addZone(page, "250, 100; 300, 100; 300, 150");
  const before = new Map(await zoneColours(page));
  assert.equal(before.size, 3);
  assert.equal(new Set(before.values()).size, 3, "three zones, three colours");

  await page.getByRole("button", { name: "Delete zone 1" }).click();
  const after = new Map(await zoneColours(page));
  assert.deepEqual([...after.keys()], ["kiosk", "zone 2"]);
  assert.equal(after.get("zone 2"), before.get("zone 2"), "zone 2 kept its colour though it moved up the list");
  assert.equal(after.get("kiosk"), before.get("kiosk"));

  // Renaming keeps the colour too.
  await page.getByLabel("Name of zone 2").fill("bench");
  await page.getByLabel("Name of zone 2").press("Enter");
  assert.equal(new Map(await zoneColours(page)).get("bench"), before.get("zone 2"), "a renamed zone keeps its colour");
  assert.deepEqual(seen.errors, []);
  await page.close();
});
