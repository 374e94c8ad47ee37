import { expect, type Page } from "@playwright/test";

// Shared by the calibration, imports and refill-plan browser tests: sign in as a demo account.
export async function signInAs(page: Page, email: string) {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("halftrip-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("heading", { name: "Overview" })).toBeVisible();
}
