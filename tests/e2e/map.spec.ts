import { expect, test, type Page } from "@playwright/test";
import accounts from "../../db/seed/demo-accounts.json" with { type: "json" };

const steward = accounts.find((a) => a.email === "steward@demo.nightmark.example")!;

async function signIn(page: Page, email: string, password: string) {
  await page.goto("/signin");
  await page.locator("#email").fill(email);
  await page.locator("#password").fill(password);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
  await page.waitForURL((u) => !u.pathname.startsWith("/signin"));
}

/** Token "r g b" triplets from the page's CSS variables (what the map reads at run time). */
async function tokens(page: Page, names: string[]): Promise<Record<string, [number, number, number]>> {
  return page.evaluate((ns) => {
    const cs = getComputedStyle(document.documentElement);
    return Object.fromEntries(ns.map((n) => [n, cs.getPropertyValue(`--nm-${n}`).trim().split(/\s+/).map(Number)])) as Record<string, [number, number, number]>;
  }, names);
}

/** Counts pixels of a PNG (decoded in the page) within `tol` of each target colour. */
async function countColours(page: Page, png: Buffer, targets: Record<string, [number, number, number]>, tol = 10) {
  return page.evaluate(
    async ({ b64, targets, tol }) => {
      const img = new Image();
      img.src = `data:image/png;base64,${b64}`;
      await img.decode();
      const c = document.createElement("canvas");
      c.width = img.width;
      c.height = img.height;
      const g = c.getContext("2d")!;
      g.drawImage(img, 0, 0);
      const d = g.getImageData(0, 0, c.width, c.height).data;
      const out: Record<string, number> = Object.fromEntries(Object.keys(targets).map((k) => [k, 0]));
      for (let i = 0; i < d.length; i += 4) {
        for (const [k, [r, gg, b]] of Object.entries(targets)) {
          if (Math.abs(d[i]! - r) <= tol && Math.abs(d[i + 1]! - gg) <= tol && Math.abs(d[i + 2]! - b) <= tol) out[k]!++;
        }
      }
      return out;
    },
    { b64: png.toString("base64"), targets, tol },
  );
}

test.describe("the network map", () => {
  test("draws site polygons and station circles, and a station opens its popup", async ({ page }) => {
    await signIn(page, steward.email, steward.password);
    await page.goto("/map");
    const map = page.getByTestId("night-map");
    await expect(map).toHaveAttribute("data-map-ready", "true", { timeout: 30_000 });

    // Narrow to one site: the map fits to it, so its polygon fills a good part of the canvas.
    await page.getByLabel("Site", { exact: true }).selectOption("hollow-pine-reserve");
    // The site's four demo stations (other tests may have registered more inside it); none from other sites.
    const listed = page.getByTestId("station-list").locator("button[data-station]");
    await expect(listed.filter({ hasText: "Visitor Centre" })).toHaveCount(0);
    for (const name of ["North Ridge", "Juniper Flat", "Ranger Post", "East Mesa"]) await expect(listed.filter({ hasText: name })).toHaveCount(1);
    await page.waitForTimeout(300);
    await expect(map).toHaveAttribute("data-map-ready", "true", { timeout: 30_000 });

    // The stations the steward may see are listed; their ramp classes tell which colours to look for.
    const list = page.getByTestId("station-list").locator("button[data-station]");
    await expect(list.first()).toBeVisible();
    const t = await tokens(page, ["surface", "accent", "ramp-4", "ramp-5", "ramp-6"]);
    const shot = await map.locator("canvas").screenshot();
    // Site fill: accent at 25 % over the land colour (surface).
    const fill = [0, 1, 2].map((i) => Math.round(0.25 * t.accent![i]! + 0.75 * t.surface![i]!)) as [number, number, number];
    const counts = await countColours(page, shot, { siteFill: fill, ramp4: t["ramp-4"]!, ramp5: t["ramp-5"]!, ramp6: t["ramp-6"]! });
    expect(counts.siteFill, "site polygon fill pixels").toBeGreaterThan(50);
    // The demo sites the steward keeps are dark (ramp classes 4–6): station circles in those colours.
    expect(counts.ramp4! + counts.ramp5! + counts.ramp6!, "station circle pixels").toBeGreaterThan(20);

    // A real click on a station's position (projected by the map's test hook) opens its popup.
    const first = list.first();
    const [lon, lat] = ((await first.getAttribute("data-lnglat")) ?? "").split(",").map(Number);
    const name = (await first.locator("span.font-bold").textContent())!.trim();
    const pt = await page.evaluate(([lo, la]) => window.__nightmarkMap?.project(lo!, la!) ?? null, [lon, lat]);
    expect(pt).not.toBeNull();
    await page.mouse.click(pt!.x, pt!.y);
    const popup = page.getByTestId("map-popup");
    await expect(popup).toBeVisible();
    await expect(popup).toContainText("mag/arcsec²");
    await expect(popup.getByRole("link", { name: /Station page/ })).toHaveAttribute("href", /\/stations\//);
    await expect(popup).toContainText(name.split(" ")[0]!);

    // The list buttons fly to a station and open its popup too (keyboard path).
    await list.nth(1).click();
    await expect(page.getByTestId("map-popup")).toContainText("30-night median");
  });

  test("the site page's charts render with data", async ({ page }) => {
    await signIn(page, steward.email, steward.password);
    await page.goto("/sites/hollow-pine-reserve");
    await expect(page.getByTestId("darkness-now")).toHaveText(/^\d\d\.\d\d$/);
    const charts = page.getByTestId("site-charts");
    await expect(charts.locator('[data-chart="nightly"] svg path').first()).toBeAttached({ timeout: 20_000 });
    await expect(charts.locator('[data-chart="histogram"] svg path').first()).toBeAttached();
    await expect(charts.locator('[data-chart="seasons"] svg path').first()).toBeAttached();
    expect(await charts.locator('[data-chart="nightly"] svg path').count()).toBeGreaterThan(5);
    await expect(page.getByTestId("stations-table").locator("tbody tr").first()).toBeVisible();
  });
});

test.describe("public site pages", () => {
  test("a public site is reachable signed out, a private one is 404", async ({ page }) => {
    const res = await page.goto("/s/hollow-pine-reserve");
    expect(res?.status()).toBe(200);
    await expect(page.getByRole("heading", { name: "Hollow Pine Reserve" })).toBeVisible();
    await expect(page.getByText(/rounded to about 1 km/)).toBeVisible();
    for (const a of accounts) await expect(page.locator("body")).not.toContainText(a.name);
    const priv = await page.goto("/s/marrow-hill-common");
    expect(priv?.status()).toBe(404);
  });
});
