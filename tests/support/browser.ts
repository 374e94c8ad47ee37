import { expect, type Page } from "@playwright/test";
import { DEMO_PASSWORD } from "./session";

// Signs a browser page in as a demo account through the sign-in form, as a person would.
export async function signInAs(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("heading", { name: "Overview" })).toBeVisible();
}
