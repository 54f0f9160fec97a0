/**
 * Alerts on the demo scenario (SEED_PROFILE=test; db/seed/scenario.ts):
 * - hollow-pine-reserve: the dark control, no trend of artificial light → no alert;
 * - cedar-basin-park: slow brightening (the model's −0.055…−0.07 mag/yr per station) → brightening_trend;
 * - marrow-hill-common: a step of −0.38…−0.45 mag 120 nights ago → sudden_step.
 * E-mail goes through the running worker (send-mail jobs) to the SMTP fake of the test stack.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { randomUUID } from "node:crypto";
import { and, eq, inArray, sql } from "drizzle-orm";
import nodemailer from "nodemailer";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { alertRules, alerts, emailOutbox, sites, users } from "@/db/schema";
import { evaluateAllSites, evaluateSite, type EvaluationReport } from "@/lib/alerts/evaluate";
import { addToOutbox, sendOutboxRow } from "@/lib/alerts/outbox";
import { acknowledgeAlert } from "@/lib/alerts/service";
import type { Ctx } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { APP_URL } from "../helpers/env";
import { clearInbox, listMessages } from "../helpers/mail";

const db = getDb();
const SLUGS = ["hollow-pine-reserve", "cedar-basin-park", "marrow-hill-common"];
let siteIds: Record<string, string> = {};
let first: EvaluationReport[] = [];

async function ctxFor(email: string): Promise<Ctx> {
  const [u] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  if (!u) throw new Error(`no demo user ${email}`);
  return { db, user: { id: u.id, email: u.email, name: u.name, role: u.role } };
}

async function waitUntil<T>(
  what: string,
  fn: () => Promise<T | null | undefined | false>,
  timeoutMs = 45_000,
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 300));
  }
}

const activeCount = async () =>
  (
    await db
      .select({ n: sql<number>`count(*)::int` })
      .from(alerts)
      .where(
        and(
          inArray(alerts.siteId, Object.values(siteIds)),
          inArray(alerts.status, ["open", "acknowledged"]),
        ),
      )
  )[0]!.n;
const outboxCount = async () =>
  (
    await db
      .select({ n: sql<number>`count(*)::int` })
      .from(emailOutbox)
      .innerJoin(alerts, eq(alerts.id, emailOutbox.alertId))
      .where(inArray(alerts.siteId, Object.values(siteIds)))
  )[0]!.n;

beforeAll(async () => {
  const rows = await db
    .select({ id: sites.id, slug: sites.slug })
    .from(sites)
    .where(inArray(sites.slug, SLUGS));
  siteIds = Object.fromEntries(rows.map((r) => [r.slug, r.id]));
  expect(Object.keys(siteIds).sort()).toEqual([...SLUGS].sort());
  // A clean start for the demo sites: their rules (and with them alerts, events, outbox rows) go,
  // so the first evaluation below creates the default rules and opens every alert afresh.
  await db.delete(alertRules).where(inArray(alertRules.siteId, Object.values(siteIds)));
  await clearInbox();
  first = (await evaluateAllSites()).filter((r) => SLUGS.includes(r.slug));
});

describe("evaluating the demo scenario with the default rules", () => {
  const opened = (slug: string) => first.find((r) => r.slug === slug)!.opened;

  it("creates the default rules for sites that had none", () => {
    for (const r of first) expect(r.rulesCreated).toBe(5);
  });

  it("cedar-basin-park: a significant brightening trend steeper than 0.03 mag/yr", async () => {
    const a = opened("cedar-basin-park").find((o) => o.kind === "brightening_trend");
    expect(a, JSON.stringify(opened("cedar-basin-park"))).toBeTruthy();
    const [row] = await db.select().from(alerts).where(eq(alerts.id, a!.alertId));
    const d = row!.details as {
      slopeMagPerYear: number;
      p: number;
      brighteningPercentPerYear: number;
    };
    expect(d.slopeMagPerYear).toBeLessThanOrEqual(-0.03); // default rule threshold (lib/alerts/rules.ts)
    expect(d.p).toBeLessThan(0.05);
    expect(d.brighteningPercentPerYear).toBeGreaterThan(2.8); // 100·(10^(0.4·0.03) − 1) = 2.80 % [calc]
  });

  it("marrow-hill-common: a sudden step of about −0.4 mag, dated about 120 nights ago", async () => {
    const a = opened("marrow-hill-common").find((o) => o.kind === "sudden_step");
    expect(a, JSON.stringify(opened("marrow-hill-common"))).toBeTruthy();
    const [row] = await db.select().from(alerts).where(eq(alerts.id, a!.alertId));
    const d = row!.details as { shiftMag: number; since: string };
    // db/seed/scenario.ts: steps of −0.45, −0.38 and −0.42 mag at its three stations, 120 nights ago.
    expect(d.shiftMag).toBeLessThan(-0.3);
    expect(d.shiftMag).toBeGreaterThan(-0.5);
    const daysAgo = (Date.now() - Date.parse(`${d.since}T12:00:00Z`)) / 86_400_000;
    expect(daysAgo).toBeGreaterThan(110);
    expect(daysAgo).toBeLessThan(132);
  });

  it("hollow-pine-reserve: no alert", () => {
    expect(opened("hollow-pine-reserve")).toEqual([]);
  });

  it("each steward's e-mails arrive exactly once, with text and HTML, the site link and the settings link", async () => {
    const ids = first.flatMap((r) => r.outboxIds);
    expect(ids.length).toBeGreaterThan(0);
    const rows = await waitUntil("every alert e-mail sent by the worker", async () => {
      const r = await db.select().from(emailOutbox).where(inArray(emailOutbox.id, ids));
      return r.every((x) => x.status === "sent") ? r : null;
    });
    const marrowSteward = rows.filter((r) => r.recipient === "steward2@demo.nightmark.example");
    expect(marrowSteward.length).toBe(opened("marrow-hill-common").length); // db/seed/scenario.ts: steward2 keeps Marrow Hill
    const messages = await listMessages();
    for (const r of rows) {
      const got = messages.filter((m) => m.subject === r.subject && m.to.includes(r.recipient));
      expect(got.length, `${r.recipient}: ${r.subject}`).toBe(1);
      const m = got[0]!;
      expect(m.text.length).toBeGreaterThan(50);
      expect(m.html).toContain("<table");
      const slug = r.subject.includes("Marrow") ? "marrow-hill-common" : "cedar-basin-park";
      expect(m.text).toContain(`${APP_URL.replace(/\/$/, "")}/sites/${slug}`);
      expect(m.text).toMatch(/\/settings\/notifications\?token=[A-Za-z0-9_-]{40,}/);
      expect(r.headers["List-Unsubscribe"]).toMatch(
        /^<http.*\/api\/v1\/notifications\/unsubscribe\?token=/,
      );
    }
    expect(messages.filter((m) => /^Nightmark alert/.test(m.subject)).length).toBe(rows.length);
  });

  it("acknowledging works, and only for the site's stewards", async () => {
    const step = opened("marrow-hill-common").find((o) => o.kind === "sudden_step")!;
    const other = await ctxFor("steward@demo.nightmark.example"); // keeps Hollow Pine and Cedar Basin only
    await expect(
      acknowledgeAlert({ ctx: other, input: { alertId: step.alertId, note: "not mine" } }),
    ).rejects.toSatisfy((e: unknown) => e instanceof AppError && e.status === 404);
    const ctx = await ctxFor("steward2@demo.nightmark.example");
    const row = await acknowledgeAlert({
      ctx,
      input: { alertId: step.alertId, note: "The new car park; talking to the council." },
    });
    expect(row).toMatchObject({
      status: "acknowledged",
      acknowledgedBy: ctx.user!.id,
      note: "The new car park; talking to the council.",
    });
    await expect(
      acknowledgeAlert({ ctx, input: { alertId: step.alertId, note: "" } }),
    ).rejects.toSatisfy((e: unknown) => e instanceof AppError && e.status === 409);
  });

  it("re-evaluating (twice at once) updates instead of duplicating alerts or e-mails", async () => {
    const before = {
      active: await activeCount(),
      outbox: await outboxCount(),
      inbox: (await listMessages()).length,
    };
    const again = await Promise.all([
      evaluateSite(siteIds["marrow-hill-common"]!),
      evaluateSite(siteIds["marrow-hill-common"]!),
      evaluateAllSites(),
    ]);
    const reports = again.flat().filter((r): r is EvaluationReport => !!r);
    expect(reports.flatMap((r) => r.opened)).toEqual([]);
    expect(reports.flatMap((r) => r.outboxIds)).toEqual([]);
    expect(await activeCount()).toBe(before.active);
    expect(await outboxCount()).toBe(before.outbox);
    const [ack] = await db
      .select()
      .from(alerts)
      .where(
        and(
          eq(alerts.siteId, siteIds["marrow-hill-common"]!),
          eq(alerts.kind, "sudden_step"),
          inArray(alerts.status, ["open", "acknowledged"]),
        ),
      );
    expect(ack!.status).toBe("acknowledged"); // the same alert, still acknowledged
    await new Promise((r) => setTimeout(r, 1500));
    expect((await listMessages()).length).toBe(before.inbox);
  });
});

describe("an SMTP outage during a send", () => {
  let fake: ChildProcess | null = null;
  let dir = "";
  afterAll(() => {
    fake?.kill("SIGTERM");
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  const freePort = () =>
    new Promise<number>((resolve, reject) => {
      const s = createServer();
      s.once("error", reject);
      s.listen(0, "127.0.0.1", () => {
        const port = (s.address() as { port: number }).port;
        s.close(() => resolve(port));
      });
    });

  it("marks the row failed, and the retry delivers exactly once when the server is back", async () => {
    const [smtpPort, webPort] = [await freePort(), await freePort()];
    // Our own outbox row (no job enqueued, so the worker leaves it to this test).
    const [anyAlert] = await db
      .select({ id: alerts.id })
      .from(alerts)
      .where(eq(alerts.siteId, siteIds["marrow-hill-common"]!))
      .limit(1);
    const id = (await addToOutbox(db, {
      dedupeKey: `test:smtp-outage:${randomUUID()}`,
      alertId: anyAlert!.id,
      recipient: "steward2@demo.nightmark.example",
      subject: "Nightmark test — SMTP outage retry",
      text: "retry test",
      html: "<p>retry test</p>",
    }))!;
    const transport = nodemailer.createTransport({
      host: "127.0.0.1",
      port: smtpPort,
      ignoreTLS: true,
      connectionTimeout: 2_000,
      greetingTimeout: 2_000,
    });

    await expect(sendOutboxRow(db, id, transport)).rejects.toThrow(); // nothing listens on smtpPort yet
    let [row] = await db.select().from(emailOutbox).where(eq(emailOutbox.id, id));
    expect(row).toMatchObject({ status: "failed", attempts: 1 });
    expect(row!.lastError).toMatch(/ECONNREFUSED|connect/i);

    dir = mkdtempSync(join(tmpdir(), "nm-smtp-"));
    fake = spawn(
      process.execPath,
      [
        "scripts/smtp-fake.mjs",
        "--smtp-port",
        String(smtpPort),
        "--web-port",
        String(webPort),
        "--dir",
        dir,
      ],
      { stdio: "ignore" },
    );
    const inbox = `http://127.0.0.1:${webPort}/api/messages`;
    await waitUntil(
      "the second SMTP fake",
      async () => (await fetch(inbox).catch(() => null))?.ok,
      15_000,
    );

    expect(await sendOutboxRow(db, id, transport)).toBe("sent");
    [row] = await db.select().from(emailOutbox).where(eq(emailOutbox.id, id));
    expect(row).toMatchObject({ status: "sent", attempts: 2, lastError: null });
    expect(await sendOutboxRow(db, id, transport)).toBe("already-sent"); // a duplicate job sends nothing
    const got = (await (await fetch(inbox)).json()) as { subject: string }[];
    expect(got.filter((m) => m.subject === "Nightmark test — SMTP outage retry").length).toBe(1);
    expect(got.length).toBe(1);
  });
});
