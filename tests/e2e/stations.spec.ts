import { expect, test, type Page } from "@playwright/test";
import accounts from "../../db/seed/demo-accounts.json" with { type: "json" };

// volunteer@ owns mh-summit (db/seed/scenario.ts), a station of the private Marrow Hill Common.
const volunteer = accounts.find((a) => a.email === "volunteer@demo.nightmark.example")!;
const STATION = "mh-summit";

async function signIn(page: Page, email: string, password: string) {
  await page.goto("/signin");
  await page.locator("#email").fill(email);
  await page.locator("#password").fill(password);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
  await page.waitForURL((u) => !u.pathname.startsWith("/signin"));
}

async function openStationWithReadings(page: Page) {
  await page.goto(`/stations/${STATION}`);
  await expect(page.getByRole("heading", { level: 1, name: "Summit" })).toBeVisible();
  const curve = page.getByTestId("night-curve");
  const empty = page.getByText("No readings this night");
  await expect(curve.or(empty)).toBeVisible({ timeout: 30_000 });
  // Last night may have no readings yet on a fresh seed: jump to the latest night that has some.
  if (await empty.isVisible()) await page.getByRole("button", { name: /^Show \d{4}-\d{2}-\d{2}$/ }).click();
  await expect(curve).toBeVisible({ timeout: 30_000 });
  return curve;
}

test("the night curve has readings, and a reading explains why it did or did not count", async ({ page }) => {
  await signIn(page, volunteer.email, volunteer.password);
  await page.goto("/stations");
  await expect(page.getByRole("link", { name: "Register a station" }).first()).toBeVisible();
  await page.getByRole("link", { name: "Summit", exact: true }).click();
  await page.waitForURL(`**/stations/${STATION}`);

  const curve = await openStationWithReadings(page);
  const points = curve.locator("svg .recharts-scatter-symbol");
  await expect(points.first()).toBeAttached();
  const n = await points.count();
  expect(n).toBeGreaterThan(10);

  const explanation = page.getByTestId("reading-explanation");
  await expect(explanation).toContainText("Select a reading");
  await points.nth(Math.floor(n / 2)).click({ force: true });
  // explainFlags sentences (lib/flags.ts) name the Sun or the Moon, or the meter's range or the cloud test.
  await expect(explanation).toContainText(/Counted:|Sun at|Moon at|cloud suspected|outside the meter/);
  await expect(explanation).toContainText("mag/arcsec²");

  // The keyboard does the same: focus the chart, step with the arrow keys.
  await curve.focus();
  await page.keyboard.press("Home");
  const first = await explanation.innerText();
  await page.keyboard.press("End");
  await expect(explanation).not.toHaveText(first);

  await expect(page.getByTestId("nights-table")).toBeVisible();
});

test("a new token is shown once, then only its prefix is listed; it can be revoked", async ({ page }) => {
  await signIn(page, volunteer.email, volunteer.password);
  await page.goto(`/stations/${STATION}`);
  const name = `e2e logger ${Date.now()}`;
  await page.getByLabel("New token's name").fill(name);
  await page.getByRole("button", { name: "Create token" }).click();
  const box = page.getByTestId("new-token-value");
  await expect(box).toBeVisible({ timeout: 20_000 });
  const secret = (await box.innerText()).trim();
  expect(secret).toMatch(/^nmk_[A-Za-z0-9_-]{43}$/);
  await expect(page.getByText("it will not be shown again")).toBeVisible();

  await page.reload();
  await expect(page.getByTestId("new-token-value")).toHaveCount(0);
  await expect(page.locator("body")).not.toContainText(secret);
  const row = page.getByTestId("tokens-table").getByRole("row").filter({ hasText: name });
  await expect(row).toContainText(`${secret.slice(0, 10)}…`);

  page.once("dialog", (d) => void d.accept());
  await row.getByRole("button", { name: `Revoke token ${name}` }).click();
  await expect(page.getByTestId("tokens-table").getByRole("row").filter({ hasText: name })).toContainText("revoked", { timeout: 20_000 });
});
