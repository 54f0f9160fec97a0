import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { expect, test, type Page } from "@playwright/test";
import accounts from "../../db/seed/demo-accounts.json" with { type: "json" };

const advocate = accounts.find((a) => a.role === "advocate")!;

async function signIn(page: Page, email: string, password: string) {
  await page.goto("/signin");
  await page.locator("#email").fill(email);
  await page.locator("#password").fill(password);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
  await page.waitForURL((u) => !u.pathname.startsWith("/signin"));
}

/** Pixels of a PNG (decoded in the page) darker than near-white in any channel. */
async function inkedPixels(page: Page, png: Buffer): Promise<{ inked: number; total: number }> {
  return page.evaluate(async (b64) => {
    const img = new Image();
    img.src = `data:image/png;base64,${b64}`;
    await img.decode();
    const c = document.createElement("canvas");
    c.width = img.width;
    c.height = img.height;
    const g = c.getContext("2d")!;
    g.drawImage(img, 0, 0);
    const d = g.getImageData(0, 0, c.width, c.height).data;
    let inked = 0;
    for (let i = 0; i < d.length; i += 4) if (d[i]! < 200 || d[i + 1]! < 200 || d[i + 2]! < 200) inked++;
    return { inked, total: d.length / 4 };
  }, png.toString("base64"));
}

test("an advocate makes a hearing brief, watches its progress and downloads a PDF that is not blank", async ({ page }) => {
  test.setTimeout(180_000);
  await signIn(page, advocate.email, advocate.password);
  await page.goto("/briefs");
  await expect(page.getByRole("heading", { name: "Hearing briefs" })).toBeVisible();
  // Wait for the list (or its empty state) to load before counting.
  await expect(page.getByText(/Loading your briefs/)).toHaveCount(0, { timeout: 30_000 });
  const before = await page.getByTestId("brief-item").count();

  for (const box of await page.getByRole("group", { name: "Sites" }).getByRole("checkbox").all()) await box.uncheck();
  await page.getByRole("checkbox", { name: "Hollow Pine Reserve" }).check();
  await expect(page.getByLabel("From (night)")).not.toHaveValue("");
  await page.getByRole("button", { name: "Make the brief" }).click();

  const items = page.getByTestId("brief-item");
  await expect(items).toHaveCount(before + 1, { timeout: 30_000 });
  const item = items.first();
  await expect(item.getByRole("heading")).toContainText("Hollow Pine Reserve");
  // The progress shows while the worker renders (or the brief is already done on a fast machine).
  await expect(item.getByRole("progressbar").or(item.getByTestId("download-brief"))).toBeVisible({ timeout: 30_000 });
  await expect(item).toHaveAttribute("data-status", "done", { timeout: 120_000 });

  const [download] = await Promise.all([page.waitForEvent("download"), item.getByTestId("download-brief").click()]);
  const dir = mkdtempSync(join(tmpdir(), "nm-e2e-brief-"));
  const file = join(dir, "brief.pdf");
  await download.saveAs(file);
  expect(readFileSync(file).subarray(0, 5).toString("latin1")).toBe("%PDF-");

  // poppler-utils: first page at 50 dpi as PNG (-singlefile: written as page.png, no page-number suffix).
  execFileSync("pdftoppm", ["-png", "-f", "1", "-l", "1", "-r", "50", "-singlefile", file, join(dir, "page")]);
  const png = join(dir, "page.png");
  expect(statSync(png).size).toBeGreaterThan(4_000);
  const { inked, total } = await inkedPixels(page, readFileSync(png));
  // The title page has a heading, boxes and text: well over 1 % of its pixels carry ink.
  expect(inked / total).toBeGreaterThan(0.01);
});
