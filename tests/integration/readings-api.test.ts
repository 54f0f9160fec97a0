/**
 * The station read API over HTTP: GET /api/v1/stations/{slug}/nights, …/nights.csv and …/readings.
 * Who may read (lib/stations/access.ts): the owner, stewards of its site, admins, anyone signed in
 * for approved stations of public sites, and the station's own token. Everyone else 404; a
 * signed-out caller without a token 401 (it says "authenticate", nothing about the station).
 * Demo data (db/seed/scenario.ts): mh-summit and mh-stone-wall belong to volunteer@ in the private
 * Marrow Hill Common; volunteer2@ has no claim to them.
 */
import { parse } from "csv-parse/sync";
import { and, eq, gte, lt, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { readings, stations, stationTokens } from "@/db/schema";
import { nightBounds } from "@/ingest/night";
import { issueToken } from "@/lib/stations/tokens";
import { appUrl } from "../helpers/env";
import { anonymous, demoAccount, signInAs, type SessionFetch } from "../helpers/session";

const OWN = "mh-summit";
const OTHER_OF_SAME_OWNER = "mh-stone-wall";

let owner: SessionFetch;
let stranger: SessionFetch;
let ownToken = "";
let otherToken = "";
let stationId = "";
let timeZone = "";
let lastNight = "";
const tokenIds: string[] = [];

const db = () => getDb();
const bearer = (token: string) => ({ headers: { authorization: `Bearer ${token}` } });
const addDays = (night: string, d: number) => new Date(Date.parse(`${night}T00:00:00Z`) + d * 86_400_000).toISOString().slice(0, 10);

beforeAll(async () => {
  owner = await signInAs(demoAccount("volunteer").email, demoAccount("volunteer").password);
  const v2 = (await import("../../db/seed/demo-accounts.json", { with: { type: "json" } })).default.find((a) => a.email.startsWith("volunteer2@"))!;
  stranger = await signInAs(v2.email, v2.password);
  const [st] = await db().select().from(stations).where(eq(stations.slug, OWN));
  const [other] = await db().select().from(stations).where(eq(stations.slug, OTHER_OF_SAME_OWNER));
  stationId = st!.id;
  timeZone = st!.timeZone;
  const a = await issueToken(db(), st!.id, "readings-api test", null);
  const b = await issueToken(db(), other!.id, "readings-api test (other station)", null);
  ownToken = a.token;
  otherToken = b.token;
  tokenIds.push(a.id, b.id);
  const r = await db().execute<{ n: string }>(sql`SELECT to_char(max(night), 'YYYY-MM-DD') AS n FROM night_summaries WHERE station_id = ${stationId}::uuid`);
  lastNight = r.rows[0]!.n;
});

afterAll(async () => {
  for (const id of tokenIds) await db().delete(stationTokens).where(eq(stationTokens.id, id));
});

describe("who may read", () => {
  const paths = () => [`/api/v1/stations/${OWN}/nights?from=${addDays(lastNight, -3)}&to=${lastNight}`, `/api/v1/stations/${OWN}/readings?from=${lastNight}&to=${lastNight}&limit=5`, `/api/v1/stations/${OWN}/nights.csv?from=${lastNight}&to=${lastNight}`];

  it("the owner gets the station's nights and readings", async () => {
    for (const p of paths()) expect((await owner(p)).status, p).toBe(200);
    const body = (await (await owner(paths()[0]!)).json()) as { station: { slug: string; name: string; timeZone: string }; nights: { night: string }[] };
    expect(body.station).toEqual({ slug: OWN, name: "Summit", timeZone });
    expect(body.nights.length).toBeGreaterThan(0);
    expect(body.nights.at(-1)!.night).toBe(lastNight);
  });

  it("another volunteer gets 404 (the station's existence is not revealed)", async () => {
    for (const p of paths()) {
      const res = await stranger(p);
      expect(res.status, p).toBe(404);
      expect(((await res.json()) as { error: { code: string } }).error.code).toBe("not_found");
    }
    // Same answer as for a station that does not exist.
    expect((await stranger("/api/v1/stations/no-such-station/nights")).status).toBe(404);
  });

  it("signed out without a token gets 401", async () => {
    for (const p of paths()) expect((await anonymous()(p)).status, p).toBe(401);
  });

  it("the station's own token may read its station", async () => {
    for (const p of paths()) expect((await fetch(appUrl(p), bearer(ownToken))).status, p).toBe(200);
    const body = (await (await fetch(appUrl(paths()[1]!), bearer(ownToken))).json()) as { readings: unknown[] };
    expect(body.readings.length).toBeGreaterThan(0);
  });

  it("another station's token gets 404, even though both stations have the same owner", async () => {
    for (const p of paths()) expect((await fetch(appUrl(p), bearer(otherToken))).status, p).toBe(404);
  });

  it("an unknown token gets 401", async () => {
    expect((await fetch(appUrl(paths()[0]!), bearer("nmk_not-a-real-token"))).status).toBe(401);
  });
});

describe("readings", () => {
  it("reports flags by name with the sun and moon altitude and the moon's fraction", async () => {
    const res = await owner(`/api/v1/stations/${OWN}/readings?from=${lastNight}&to=${lastNight}&limit=5000`);
    const body = (await res.json()) as { readings: { takenAt: string; mag: number; flags: string[]; usable: boolean; sunAltDeg: number; moonAltDeg: number; moonFraction: number }[] };
    const names = new Set(body.readings.flatMap((r) => r.flags));
    for (const n of names) expect(["daylight", "twilight", "moonlit", "cloud-suspect", "out-of-range"]).toContain(n);
    for (const r of body.readings) {
      expect(r.usable).toBe(r.flags.length === 0);
      expect(Math.abs(r.sunAltDeg)).toBeLessThanOrEqual(90);
      expect(r.moonFraction).toBeGreaterThanOrEqual(0);
      expect(r.moonFraction).toBeLessThanOrEqual(1);
    }
    // A night runs local noon to local noon (ingest/night.ts), so it starts in daylight.
    expect(body.readings.some((r) => r.flags.includes("twilight") || r.flags.includes("daylight"))).toBe(true);
  });

  it("pages by taken_at: every reading of three nights exactly once, in order", async () => {
    const from = addDays(lastNight, -2);
    const seen: string[] = [];
    let cursor: string | null = null;
    let pages = 0;
    do {
      const qs = new URLSearchParams({ from, to: lastNight, limit: "97" });
      if (cursor) qs.set("cursor", cursor);
      const res = await owner(`/api/v1/stations/${OWN}/readings?${qs}`);
      expect(res.status).toBe(200);
      const body = (await res.json()) as { readings: { takenAt: string }[]; next: string | null };
      expect(body.readings.length).toBeLessThanOrEqual(97);
      seen.push(...body.readings.map((r) => r.takenAt));
      cursor = body.next;
      pages++;
    } while (cursor && pages < 1000);
    const start = nightBounds(from, timeZone).start;
    const end = nightBounds(lastNight, timeZone).end;
    const rows = await db()
      .select({ t: readings.takenAt })
      .from(readings)
      .where(and(eq(readings.stationId, stationId), gte(readings.takenAt, start), lt(readings.takenAt, end)))
      .orderBy(readings.takenAt);
    expect(rows.length).toBeGreaterThan(97 * 2);
    expect(pages).toBe(Math.ceil(rows.length / 97));
    expect(new Set(seen).size).toBe(seen.length);
    expect(seen).toEqual(rows.map((r) => r.t.toISOString()));
  });

  it("accepts ISO date-times with an offset: from inclusive, to exclusive", async () => {
    const { start } = nightBounds(lastNight, timeZone);
    const rows = await db().select({ t: readings.takenAt }).from(readings).where(and(eq(readings.stationId, stationId), gte(readings.takenAt, start))).orderBy(readings.takenAt).limit(3);
    const [a, , c] = rows.map((r) => r.t.toISOString());
    const res = await owner(`/api/v1/stations/${OWN}/readings?from=${encodeURIComponent(a!)}&to=${encodeURIComponent(c!)}`);
    const body = (await res.json()) as { readings: { takenAt: string }[]; next: string | null };
    expect(body.readings.map((r) => r.takenAt)).toEqual(rows.slice(0, 2).map((r) => r.t.toISOString()));
    expect(body.next).toBeNull();
  });
});

describe("bad query parameters answer 400 naming the parameter", () => {
  const cases: [string, string, string][] = [
    ["readings", "limit=0", "limit"],
    ["readings", "limit=5001", "limit"],
    ["readings", "limit=ten", "limit"],
    ["readings", "from=2026-13-01", "from"],
    ["readings", "to=yesterday", "to"],
    ["readings", "from=2026-01-10T22:00:00", "from"],
    ["readings", "cursor=%%%", "cursor"],
    ["readings", "from=2026-02-02&to=2026-02-01", "from"],
    ["nights", "from=2026-02-30", "from"],
    ["nights", "to=20260101", "to"],
    ["nights", "from=2026-03-01&to=2026-02-01", "from"],
    ["nights", "from=2000-01-01&to=2026-01-01", "from"],
    ["nights.csv", "from=nope", "from"],
  ];
  it.each(cases)("%s?%s → 400 about %s", async (what, qs, param) => {
    const res = await owner(`/api/v1/stations/${OWN}/${what}?${qs}`);
    expect(res.status).toBe(400);
    const body = (await res.json()) as { error: { message: string } };
    expect(body.error.message.startsWith(`${param}:`), body.error.message).toBe(true);
  });
});

describe("CSV variant", () => {
  it("parses back to the same values as the JSON", async () => {
    const q = `from=${addDays(lastNight, -30)}&to=${lastNight}`;
    const json = (await (await owner(`/api/v1/stations/${OWN}/nights?${q}`)).json()) as { nights: Record<string, unknown>[] };
    const res = await owner(`/api/v1/stations/${OWN}/nights.csv?${q}`);
    expect(res.headers.get("content-type")).toMatch(/^text\/csv/);
    const rows = parse(await res.text(), { columns: true, skip_empty_lines: true }) as Record<string, string>[];
    expect(rows.length).toBe(json.nights.length);
    const map: [string, string, "text" | "number"][] = [
      ["night", "night", "text"],
      ["readings", "readings", "number"],
      ["usable_readings", "usableReadings", "number"],
      ["median_mag", "medianMag", "number"],
      ["darkest_sustained_mag", "darkestSustainedMag", "number"],
      ["spread_mag", "spreadMag", "number"],
      ["usable_hours", "usableHours", "number"],
      ["calibration_offset_mag", "calibrationOffsetMag", "number"],
      ["first_at", "firstAt", "text"],
      ["last_at", "lastAt", "text"],
    ];
    rows.forEach((row, i) => {
      const n = json.nights[i]!;
      for (const [col, key, kind] of map) {
        const cell = row[col]!;
        const want = n[key];
        if (want === null) expect(cell, `${col} of ${n.night}`).toBe("");
        else expect(kind === "number" ? Number(cell) : cell, `${col} of ${n.night}`).toBe(want);
      }
    });
  });
});
