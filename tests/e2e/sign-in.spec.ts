import { expect, test } from "@playwright/test";

const PASSWORD = "demo-tanks-and-bays";

for (const role of ["admin", "operator", "technician", "viewer"] as const) {
  test(`${role} signs in, sees the shell and signs out`, async ({ page }) => {
    await page.goto("/");
    await expect(page).toHaveURL(/\/sign-in/);
    await page.getByLabel("E-mail").fill(`${role}@halftrip.test`);
    await page.getByLabel("Password").fill(PASSWORD);
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect(page.getByRole("heading", { name: "Overview" })).toBeVisible();
    await expect(page.getByRole("navigation", { name: "Main" })).toBeVisible();
    await expect(page.getByTestId("signed-in-as")).toContainText(role);
    const usersLink = page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Users" });
    if (role === "admin") await expect(usersLink).toBeVisible();
    else await expect(usersLink).toHaveCount(0);
    await page.getByRole("button", { name: "Sign out" }).click();
    await expect(page).toHaveURL(/\/sign-in/);
    await page.goto("/");
    await expect(page).toHaveURL(/\/sign-in/);
  });
}

test("a wrong password shows the error and no session", async ({ page }) => {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill("operator@halftrip.test");
  await page.getByLabel("Password").fill("wrong-password");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.locator("#sign-in-error")).toContainText("do not match");
  await expect(page).toHaveURL(/\/sign-in/);
});

test("a malformed e-mail and an empty password are explained on the form", async ({ page }) => {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill("not-an-address");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByText("Enter a valid e-mail address")).toBeVisible();
  await expect(page.getByText("Enter your password.")).toBeVisible();
});
