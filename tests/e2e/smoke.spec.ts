import { expect, test } from "@playwright/test";

test("landing page loads with the Nightmark heading", async ({ page }) => {
  const res = await page.goto("/");
  expect(res?.status()).toBe(200);
  await expect(page.getByRole("heading", { name: /Nightmark/i }).first()).toBeVisible();
});
