import { and, eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb, pool } from "@/db";
import { dirtyNights, readings, stationTokens } from "@/db/schema";
import { DAYLIGHT, MOONLIT, TWILIGHT } from "@/lib/flags";
import { appUrl } from "../helpers/env";
import { makeStation } from "../factories/stations";

const url = appUrl("/api/v1/readings");

function post(token: string | null, body: unknown, contentType = "application/json") {
  const headers: Record<string, string> = { "content-type": contentType };
  if (token) headers.authorization = `Bearer ${token}`;
  return fetch(url, { method: "POST", headers, body: typeof body === "string" ? body : JSON.stringify(body) });
}

async function errorOf(res: Response) {
  const j = (await res.json()) as { error?: { code: string; message: string } };
  expect(j.error, "every error is {error:{code,message}}").toBeDefined();
  expect(typeof j.error!.code).toBe("string");
  expect(j.error!.message.length).toBeGreaterThan(10);
  return j.error!;
}

let fixture: Awaited<ReturnType<typeof makeStation>>;

beforeAll(async () => {
  fixture = await makeStation();
});
afterAll(async () => {
  await pool().end();
});

describe("POST /api/v1/readings", () => {
  it("stores a batch, reports accepted, and is idempotent on (station, takenAt)", async () => {
    const batch = {
      readings: [
        { takenAt: "2026-01-15T07:00:00Z", mag: 21.43, tempC: -3.5 },
        { takenAt: "2026-01-15T07:01:00Z", mag: 21.41 },
        { takenAt: "2026-01-15T00:02:00-07:00", mag: 21.4 }, // the same instant as 07:02Z, written with an offset
      ],
    };
    const first = await post(fixture.token, batch);
    expect(first.status).toBe(200);
    expect(await first.json()).toEqual({ accepted: 3, duplicates: 0, rejected: [] });
    const again = await post(fixture.token, batch);
    expect(await again.json()).toEqual({ accepted: 0, duplicates: 3, rejected: [] });
    const [{ n }] = (await getDb()
      .select({ n: sql<number>`count(*)::int` })
      .from(readings)
      .where(eq(readings.stationId, fixture.station.id))) as [{ n: number }];
    expect(n).toBe(3);
    // The night is named by its local evening date (America/Denver, UTC−7: 00:00–00:02 local on the
    // 15th belong to the night of the 14th); the worker summarises it.
    let summary: { readings: number; usable_readings: number } | undefined;
    for (let i = 0; i < 40 && !summary; i++) {
      const r = await getDb().execute<{ readings: number; usable_readings: number }>(
        sql`select readings, usable_readings from night_summaries where station_id = ${fixture.station.id} and night = '2026-01-14'`,
      );
      summary = r.rows[0];
      if (!summary) await new Promise((res) => setTimeout(res, 500));
    }
    expect(summary?.readings).toBe(3);
    const left = await getDb().select().from(dirtyNights).where(eq(dirtyNights.stationId, fixture.station.id));
    expect(left.filter((d) => d.night === "2026-01-14")).toHaveLength(0);
  });

  it("screens at ingest: sun and moon altitudes stored, flags set", async () => {
    // 2026-06-21 19:00Z is midday in Utah (sun high): daylight.
    const res = await post(fixture.token, { readings: [{ takenAt: "2026-06-21T19:00:00Z", mag: 5.2 }] });
    expect((await res.json()).accepted).toBe(1);
    const [row] = await getDb()
      .select()
      .from(readings)
      .where(and(eq(readings.stationId, fixture.station.id), eq(readings.takenAt, new Date("2026-06-21T19:00:00Z"))));
    // Solar noon near the June solstice at 37.9° N: altitude ≈ 90 − 37.9 + 23.4 = 75.5° (common practice: noon altitude = 90° − φ + δ).
    expect(row!.sunAltDeg).toBeGreaterThan(70);
    expect(row!.flags & DAYLIGHT).toBe(DAYLIGHT);
    expect(row!.flags & TWILIGHT).toBe(0);
    expect(row!.flags & MOONLIT).toBeGreaterThanOrEqual(0);
  });

  it("takes a CSV body with a header row", async () => {
    const csv = "takenAt,mag,tempC\r\n2026-02-01T08:00:00Z,21.2,1.5\r\n2026-02-01T08:01:00Z,21.25,\r\n2026-02-01T08:02:00Z,abc,2\r\n";
    const res = await post(fixture.token, csv, "text/csv");
    expect(res.status).toBe(200);
    const j = await res.json();
    expect(j.accepted).toBe(2);
    expect(j.rejected).toHaveLength(1);
    expect(j.rejected[0].index).toBe(2);
    expect(j.rejected[0].reason).toMatch(/mag/);
  });

  it("reports each bad item with its index and reason, and stores the good ones", async () => {
    const future = new Date(Date.now() + 3600_000).toISOString();
    const res = await post(fixture.token, {
      readings: [
        { takenAt: "2026-03-01T06:00:00Z", mag: 21.0 },
        { takenAt: future, mag: 21.0 },
        { takenAt: "1987-03-01T06:00:00Z", mag: 21.0 },
        { takenAt: "2026-03-01T06:01:00Z", mag: 31.0 },
        { takenAt: "2026-03-01T06:02:00Z", mag: -2 },
        { takenAt: "2026-03-01T06:03:00Z", mag: "21.1" },
        { takenAt: "2026-03-01 06:04", mag: 21.1 },
        { mag: 21.1 },
        { takenAt: "2026-03-01T06:05:00Z" },
        "not an object",
        { takenAt: "2026-03-01T06:06:00Z", mag: 21.1, tempC: 400 },
      ],
    });
    expect(res.status).toBe(200);
    const j = await res.json();
    expect(j.accepted).toBe(1);
    expect(j.rejected.map((r: { index: number }) => r.index)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
    const reasons = j.rejected.map((r: { reason: string }) => r.reason).join("\n");
    expect(reasons).toMatch(/future/);
    expect(reasons).toMatch(/implausibly old/);
    expect(reasons).toMatch(/darker than 24/);
    expect(reasons).toMatch(/brighter than 0/);
    expect(reasons).toMatch(/must be a number/);
    expect(reasons).toMatch(/offset/);
    expect(reasons).toMatch(/takenAt is missing/);
    expect(reasons).toMatch(/mag is missing/);
    expect(reasons).toMatch(/tempC/);
  });

  it("400 for a malformed body", async () => {
    const res = await post(fixture.token, "{not json");
    expect(res.status).toBe(400);
    expect((await errorOf(res)).code).toBe("bad_request");
  });

  it("401 without a token or with a wrong one", async () => {
    expect((await post(null, { readings: [] })).status).toBe(401);
    const res = await post("nmk_wrong", { readings: [{ takenAt: "2026-03-01T06:00:00Z", mag: 21 }] });
    expect(res.status).toBe(401);
    expect((await errorOf(res)).code).toBe("unauthorized");
  });

  it("403 for a revoked token and for a retired station", async () => {
    const other = await makeStation();
    await getDb().update(stationTokens).set({ revokedAt: new Date() }).where(eq(stationTokens.id, other.tokenId));
    const res = await post(other.token, { readings: [{ takenAt: "2026-03-01T06:00:00Z", mag: 21 }] });
    expect(res.status).toBe(403);
    expect((await errorOf(res)).message).toMatch(/revoked/);
    const retired = await makeStation({ status: "retired" });
    const res2 = await post(retired.token, { readings: [{ takenAt: "2026-03-01T06:00:00Z", mag: 21 }] });
    expect(res2.status).toBe(403);
    expect((await errorOf(res2)).message).toMatch(/retired/);
  });

  it("413 for more than 10,000 readings or an oversize body", async () => {
    const many = Array.from({ length: 10_001 }, (_, i) => ({ takenAt: new Date(Date.UTC(2025, 0, 1) + i * 60_000).toISOString(), mag: 21 }));
    const res = await post(fixture.token, { readings: many });
    expect(res.status).toBe(413);
    await errorOf(res);
    const big = await post(fixture.token, JSON.stringify({ readings: [], pad: "x".repeat(3 * 1024 * 1024) }));
    expect(big.status).toBe(413);
  });

  it("415 for other content types", async () => {
    const res = await post(fixture.token, "takenAt=x", "application/x-www-form-urlencoded");
    expect(res.status).toBe(415);
    expect((await errorOf(res)).code).toBe("unsupported_media_type");
  });

  it("422 for an envelope that is not a batch", async () => {
    for (const body of [[{ takenAt: "2026-03-01T06:00:00Z", mag: 21 }], { data: [] }, { readings: {} }, { readings: [] }]) {
      const res = await post(fixture.token, body);
      expect(res.status, JSON.stringify(body)).toBe(422);
      expect((await errorOf(res)).code).toBe("unprocessable");
    }
  });

  it("a token works for its own station only", async () => {
    const other = await makeStation();
    await post(other.token, { readings: [{ takenAt: "2026-04-01T06:00:00Z", mag: 21.3 }] });
    const mine = await getDb()
      .select({ n: sql<number>`count(*)::int` })
      .from(readings)
      .where(and(eq(readings.stationId, fixture.station.id), eq(readings.takenAt, new Date("2026-04-01T06:00:00Z"))));
    expect(mine[0]!.n).toBe(0);
  });
});
