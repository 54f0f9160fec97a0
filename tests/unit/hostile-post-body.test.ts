/**
 * Hostile input, property-based (fast-check): whatever arrives as a POST /api/v1/readings body, the
 * parsers either return items or throw one of our typed errors (400/413/422, never anything that
 * would become a 500), and the validator never lets an out-of-range value through.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { itemsFromCsv, itemsFromJson, MAX_BATCH } from "@/ingest/post-body";
import { CLOCK_SKEW_MS, EARLIEST_READING, TEMP_MAX_C, TEMP_MIN_C, validateItems } from "@/ingest/validate";
import { AppError } from "@/lib/errors";
import { toErrorResponse } from "@/lib/http/respond";

const NOW = Date.parse("2026-06-01T00:00:00Z");

/** Runs a parser; an error must be an AppError with a client status and a real message. */
function parseOrTypedError(fn: () => unknown[]): unknown[] | AppError {
  try {
    return fn();
  } catch (err) {
    expect(err, String(err)).toBeInstanceOf(AppError);
    const e = err as AppError;
    expect([400, 413, 422]).toContain(e.status);
    expect(e.message.length).toBeGreaterThan(10);
    return e;
  }
}

function expectValidInvariants(items: unknown[]) {
  const { valid, rejected } = validateItems(items, NOW);
  expect(valid.length + rejected.length).toBe(items.length);
  for (const v of valid) {
    expect(Number.isFinite(v.mag)).toBe(true);
    expect(v.mag).toBeGreaterThanOrEqual(0);
    expect(v.mag).toBeLessThanOrEqual(24);
    expect(Number.isNaN(v.takenAt.getTime())).toBe(false);
    expect(v.takenAt.getTime()).toBeLessThanOrEqual(NOW + CLOCK_SKEW_MS);
    expect(v.takenAt.getTime()).toBeGreaterThanOrEqual(EARLIEST_READING.getTime());
    if (v.tempC !== null) {
      expect(Number.isFinite(v.tempC)).toBe(true);
      expect(v.tempC).toBeGreaterThanOrEqual(TEMP_MIN_C);
      expect(v.tempC).toBeLessThanOrEqual(TEMP_MAX_C);
    }
  }
  for (const r of rejected) {
    expect(typeof r.reason).toBe("string");
    expect(r.reason.length).toBeGreaterThan(5);
    expect(r.reason.length).toBeLessThan(400); // echoes of hostile input are cut short
  }
}

const isoish = fc.oneof(
  fc.date({ min: new Date("1990-01-01"), max: new Date("2030-01-01"), noInvalidDate: true }).map((d) => d.toISOString()),
  fc.string(),
  fc.constantFrom("2026-02-30T10:00:00Z", "2026-01-01T25:61:00Z", "2026-01-01T00:00:00", "2026-01-01T00:00:00+99:99", "", " ", "null"),
);
const magish = fc.oneof(
  fc.double(),
  fc.constantFrom(Number.NaN, Infinity, -Infinity, -0, 24.0000001, -1e-9, 1e308),
  fc.string(),
  fc.constant(null),
  fc.boolean(),
);
const item = fc.oneof(
  fc.record({ takenAt: isoish, mag: magish, tempC: fc.oneof(fc.double(), fc.string(), fc.constant(undefined)) }, { requiredKeys: [] }),
  fc.anything(),
);

describe("POST body parsers under hostile input", () => {
  it("arbitrary text as JSON: items or a typed 4xx error", () => {
    fc.assert(
      fc.property(fc.oneof(fc.string(), fc.json(), fc.string({ unit: "grapheme" })), (text) => {
        const r = parseOrTypedError(() => itemsFromJson(text));
        if (Array.isArray(r)) expectValidInvariants(r);
      }),
      { numRuns: 500 },
    );
  });

  it("batch-shaped JSON with hostile items: every item accepted or rejected with a reason", () => {
    fc.assert(
      fc.property(fc.array(item, { minLength: 1, maxLength: 60 }), (items) => {
        const r = parseOrTypedError(() => itemsFromJson(JSON.stringify({ readings: items })));
        expect(Array.isArray(r)).toBe(true);
        expectValidInvariants(r as unknown[]);
      }),
      { numRuns: 300 },
    );
  });

  it("arbitrary text as CSV: items or a typed 4xx error", () => {
    const cell = fc.oneof(fc.string({ maxLength: 30 }), fc.double().map(String), isoish, fc.constantFrom('"', '""', ",", "\n", "\r\n", "\uFEFF"));
    const csv = fc.oneof(
      fc.string(),
      fc.array(fc.array(cell, { maxLength: 5 }), { maxLength: 30 }).map((rows) => ["takenAt,mag,tempC", ...rows.map((r) => r.join(","))].join("\n")),
    );
    fc.assert(
      fc.property(csv, (text) => {
        const r = parseOrTypedError(() => itemsFromCsv(text));
        if (Array.isArray(r)) expectValidInvariants(r);
      }),
      { numRuns: 500 },
    );
  });

  it("prototype keys and deep nesting do not break the envelope check", () => {
    for (const text of ['{"__proto__":{"readings":[1]}}', '{"constructor":{"prototype":{}}}', "[".repeat(5000) + "]".repeat(5000), '{"readings":{"length":5}}']) {
      const r = parseOrTypedError(() => itemsFromJson(text));
      expect(r).toBeInstanceOf(AppError);
    }
  });

  it("more than MAX_BATCH items is a 413, not a slow validation", () => {
    const many = JSON.stringify({ readings: Array.from({ length: MAX_BATCH + 1 }, () => ({})) });
    const r = parseOrTypedError(() => itemsFromJson(many));
    expect((r as AppError).status).toBe(413);
  });

  it("every typed error becomes the documented {error:{code,message}} reply", async () => {
    await fc.assert(
      fc.asyncProperty(fc.string(), async (text) => {
        const r = parseOrTypedError(() => itemsFromJson(text));
        if (Array.isArray(r)) return;
        const res = toErrorResponse(r);
        const body = (await res.json()) as { error: { code: string; message: string } };
        expect(res.status).toBe(r.status);
        expect(Object.keys(body)).toEqual(["error"]);
        expect(typeof body.error.code).toBe("string");
        expect(typeof body.error.message).toBe("string");
      }),
      { numRuns: 200 },
    );
  });
});
