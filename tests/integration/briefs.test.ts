/**
 * Hearing briefs over HTTP against the running app + worker (npm test starts both), signed in as the
 * demo advocate: create → the worker renders → download → the PDF says what the site's JSON says.
 * Expected values come from the app's own JSON routes (GET /api/v1/sites/{slug}/summary and
 * /nights, lib/sites/service.ts), which the site page shows: the brief must print the same numbers.
 */
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { median } from "@/lib/stats/robust";
import { anonymous, signInAsRole, type SessionFetch } from "../helpers/session";

const SLUG = "hollow-pine-reserve";
const dir = mkdtempSync(join(tmpdir(), "nm-briefs-"));

function pdfText(bytes: Buffer): string {
  const file = join(dir, `b-${Date.now()}.pdf`);
  writeFileSync(file, bytes);
  // poppler-utils' pdftotext (npm test installs it); "-" writes the text to stdout.
  return execFileSync("pdftotext", ["-enc", "UTF-8", file, "-"], { encoding: "utf8" }).replace(/\s+/g, " ");
}

type Brief = { id: string; status: string; progress: number; error: string | null; verificationCode: string | null; shares: { id: string }[] };

async function waitDone(f: SessionFetch, id: string, timeoutMs = 90_000): Promise<Brief> {
  const seen = new Set<number>();
  const end = Date.now() + timeoutMs;
  while (Date.now() < end) {
    const res = await f("/api/v1/briefs");
    expect(res.status).toBe(200);
    const b = ((await res.json()) as { briefs: Brief[] }).briefs.find((x) => x.id === id);
    expect(b, "the new brief is in my list").toBeTruthy();
    seen.add(b!.progress);
    if (b!.status === "done") return b!;
    if (b!.status === "failed") throw new Error(`brief failed: ${b!.error}`);
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`brief ${id} not done after ${timeoutMs} ms (progress seen: ${[...seen].join(", ")})`);
}

let advocate: SessionFetch;
let briefId: string;
let pdf: Buffer;
let text: string;
let summary: { site: { name: string }; darkness: { medianMag: number; lastNight: string } };
let from: string;
let to: string;

beforeAll(async () => {
  advocate = await signInAsRole("advocate");
  summary = await (await advocate(`/api/v1/sites/${SLUG}/summary`)).json();
  expect(summary.darkness, "the test seed has usable nights at this site").toBeTruthy();
  // A year ending on the site's last night with a value, so the site page's "last 30 nights" is the period's.
  to = summary.darkness.lastNight;
  const d = new Date(`${to}T00:00:00Z`);
  d.setUTCFullYear(d.getUTCFullYear() - 1);
  d.setUTCDate(d.getUTCDate() + 1);
  from = d.toISOString().slice(0, 10);
  const res = await advocate("/api/v1/briefs", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ sites: [SLUG], from, to }) });
  expect(res.status).toBe(202);
  briefId = ((await res.json()) as { id: string }).id;
  await waitDone(advocate, briefId);
  const dl = await advocate(`/api/v1/briefs/${briefId}/pdf`);
  expect(dl.status).toBe(200);
  expect(dl.headers.get("content-type")).toBe("application/pdf");
  pdf = Buffer.from(await dl.arrayBuffer());
  text = pdfText(pdf);
}, 150_000);

describe("a hearing brief for hollow-pine-reserve", () => {
  it("is a PDF", () => {
    expect(pdf.subarray(0, 5).toString("latin1")).toBe("%PDF-");
    expect(pdf.length).toBeGreaterThan(10_000);
  });

  it("names the site and the period", () => {
    expect(text).toContain(summary.site.name);
    expect(text).toContain(`${from} to ${to}`);
  });

  it("prints the site page's darkness now (GET /summary) at its printed precision, 2 decimals", () => {
    expect(text).toContain(`(the site page's "darkness now"): ${summary.darkness.medianMag.toFixed(2)} mag/arcsec²`);
  });

  it("prints the median of the period's nightly site values (GET /nights for the period)", async () => {
    const body = (await (await advocate(`/api/v1/sites/${SLUG}/nights?from=${from}&to=${to}`)).json()) as { nights: { mag: number }[] };
    expect(body.nights.length).toBeGreaterThan(30);
    const m = median(body.nights.map((n) => n.mag));
    expect(text).toContain(`${m.toFixed(2)} mag/arcsec² From ${body.nights.length} nights`);
  });

  it("has the methods, the cautions and a page footer with the verification code", async () => {
    const list = ((await (await advocate("/api/v1/briefs")).json()) as { briefs: Brief[] }).briefs;
    const code = list.find((b) => b.id === briefId)!.verificationCode!;
    expect(code).toMatch(/^[A-Z2-7]{10}$/);
    expect(text).toContain("Methods and sources");
    expect(text).toContain("Mann–Kendall");
    expect(text).toContain("Theil–Sen");
    expect(text).toContain("A zenith reading is not a compliance measurement");
    expect(text).toContain("Lighting design and code compliance belong to qualified lighting professionals and the local codes");
    expect(text).toMatch(/Page 1 of \d+/);
    expect(text).toContain(`verification code ${code}`);
  });

  it("the verification page says which data the code maps to, signed out", async () => {
    const list = ((await (await advocate("/api/v1/briefs")).json()) as { briefs: Brief[] }).briefs;
    const code = list.find((b) => b.id === briefId)!.verificationCode!;
    const res = await anonymous()(`/verify/${code.toLowerCase()}`);
    expect(res.status).toBe(200);
    const html = await res.text();
    expect(html).toContain(summary.site.name);
    expect(html).toContain(from);
    expect(html).toContain(to);
    expect(html).not.toContain("advocate@demo");
    expect((await anonymous()("/verify/AAAAAAAAAA")).status).toBe(404);
  });

  it("a share link downloads signed out, and 404s after it is revoked", async () => {
    const res = await advocate(`/api/v1/briefs/${briefId}/shares`, { method: "POST" });
    expect(res.status).toBe(201);
    const share = (await res.json()) as { id: string; token: string; url: string };
    const anon = anonymous();
    const got = await anon(`/api/v1/briefs/shared/${share.token}`);
    expect(got.status).toBe(200);
    expect(Buffer.from(await got.arrayBuffer()).equals(pdf)).toBe(true);
    expect((await advocate(`/api/v1/briefs/${briefId}/shares/${share.id}`, { method: "DELETE" })).status).toBe(200);
    expect((await anon(`/api/v1/briefs/shared/${share.token}`)).status).toBe(404);
    expect((await anon(`/api/v1/briefs/shared/${share.token.slice(0, -2)}xx`)).status).toBe(404);
  });

  it("another user's brief answers 404 (a steward, a volunteer); signed out 401", async () => {
    const steward = await signInAsRole("steward");
    expect((await steward(`/api/v1/briefs/${briefId}/pdf`)).status).toBe(404);
    expect((await steward(`/api/v1/briefs/${briefId}/shares`, { method: "POST" })).status).toBe(404);
    const volunteer = await signInAsRole("volunteer");
    expect((await volunteer(`/api/v1/briefs/${briefId}/pdf`)).status).toBe(404);
    expect((await anonymous()(`/api/v1/briefs/${briefId}/pdf`)).status).toBe(401);
    const admin = await signInAsRole("admin");
    expect((await admin(`/api/v1/briefs/${briefId}/pdf`)).status).toBe(200);
  });

  it("refuses a bad period with a clear message", async () => {
    const res = await advocate("/api/v1/briefs", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ sites: [SLUG], from: to, to: from }) });
    expect(res.status).toBe(400);
    const body = (await res.json()) as { error: { message: string } };
    expect(body.error.message).toMatch(/end on or after/);
  });
});
