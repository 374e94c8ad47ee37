import { expect, test, type Page } from "@playwright/test";
import { signedIn } from "../support/session";
import { signInAs } from "../support/browser";
import { createTankWithDevice } from "../support/fleet";

// Issue 6, browser test: an admin imports a strapping table, then a bad CSV: the errors are listed by
// line and nothing is imported.

async function chooseFile(page: Page, name: string, text: string) {
  await page.getByLabel("CSV file", { exact: true }).setInputFiles({ name, mimeType: "text/csv", buffer: Buffer.from(text, "utf8") });
}

test("an admin imports a strapping table, then a bad CSV that imports nothing", async ({ page }) => {
  test.setTimeout(120_000);
  const admin = await signedIn("admin@halftrip.test");
  const good = await createTankWithDevice(admin);
  const bad = await createTankWithDevice(admin);

  await signInAs(page, "admin@halftrip.test");
  await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Imports" }).click();
  await expect(page.getByRole("heading", { name: "Imports", exact: true })).toBeVisible();

  await page.getByLabel("Strapping table").check();
  await expect(page.getByText("level_m,volume_l")).toBeVisible();
  await page.getByLabel("Tank", { exact: true }).selectOption({ value: good.tank.id });
  await chooseFile(page, "strapping.csv", "level_m,volume_l\n0,0\n0.5,450\n1.0,1000\n2.0,2300\n2.8,3300\n");
  await page.getByRole("button", { name: "Upload and import" }).click();
  const progress = page.getByTestId("upload-progress");
  await expect(progress.getByRole("status")).toContainText("imported");
  await expect(progress.getByRole("status")).toContainText("Imported 5 rows.");
  await expect(progress.getByRole("progressbar", { name: "Lines read" })).toHaveAttribute("aria-valuenow", "100");
  const asset = (await admin.get(`/api/assets/${good.tank.id}`).expect(200)).body;
  expect(asset.geometry.shape).toBe("strapping");
  expect(asset.capacity_l).toBeCloseTo(3300, 6);

  await page.getByLabel("Tank", { exact: true }).selectOption({ value: bad.tank.id });
  await chooseFile(page, "bad-strapping.csv", "level_m,volume_l\n0,0\n0.5,950\n1.0;1000\n1.5,900\n2.0,abc\n2.5,2300\n");
  await page.getByRole("button", { name: "Upload and import" }).click();
  await expect(progress.getByRole("status")).toContainText("rejected, nothing imported");
  await expect(progress.getByRole("status")).toContainText("3 lines have errors; nothing was imported.");
  const errors = progress.getByRole("table", { name: /Errors by line/ });
  await expect(errors.getByRole("row", { name: /^4 / })).toContainText("1 field where the header has 2");
  await expect(errors.getByRole("row", { name: /^5 / })).toContainText("cannot fall");
  await expect(errors.getByRole("row", { name: /^6 / })).toContainText('volume_l "abc" is not a number');
  await expect(page.getByRole("button", { name: "Import the 3 good rows only" })).toBeVisible();
  expect((await admin.get(`/api/assets/${bad.tank.id}`).expect(200)).body.geometry.shape).toBe("rectangular");

  const history = page.getByRole("region", { name: "Upload history" });
  await expect(history.getByRole("row").filter({ hasText: bad.tank.name })).toContainText("rejected, nothing imported");
  await expect(history.getByRole("row").filter({ hasText: good.tank.name })).toContainText("imported");
});
