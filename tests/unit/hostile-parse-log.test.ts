/**
 * Hostile logger files and upload metadata, property-based: the reader of ingest/parse-log.ts
 * yields a reading or a line-numbered refusal for every line, and only ever throws its own
 * LogFormatError (a whole-file problem the upload reports); the multipart `mapping` field is parsed
 * or refused with a 400. Skipped while the upload feature is absent from the tree.
 */
import { existsSync } from "node:fs";
import { join } from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { AppError } from "@/lib/errors";

const ROOT = join(__dirname, "..", "..");
const hasParser = existsSync(join(ROOT, "ingest", "parse-log.ts"));
const hasUploadService = existsSync(join(ROOT, "lib", "uploads", "service.ts"));

async function* chunks(text: string, size: number) {
  const bytes = new TextEncoder().encode(text);
  for (let i = 0; i < bytes.length; i += size) yield bytes.subarray(i, i + size);
}

const cell = fc.oneof(
  fc.string({ maxLength: 25 }),
  fc.double().map(String),
  fc.date({ min: new Date("1999-01-01"), max: new Date("2031-01-01"), noInvalidDate: true }).map((d) => d.toISOString()),
  fc.constantFrom('"', '""', '"a,b"', "\t", ";", "21,43", "2024-03-10 02:30:00", "# note", "\uFEFF", "\r", "x".repeat(70_000)),
);
const delim = fc.constantFrom(",", ";", "\t");
const file = fc.oneof(
  fc.string({ maxLength: 400 }),
  fc.tuple(delim, fc.array(fc.array(cell, { maxLength: 5 }), { maxLength: 25 }), fc.constantFrom("\n", "\r\n")).map(([d, rows, eol]) =>
    ["# logger: fuzz", ["time", "mag", "temp"].join(d), ...rows.map((r) => r.join(d))].join(eol),
  ),
);

describe.skipIf(!hasParser)("logger file reader under hostile input", () => {
  it("every line is a reading or a refusal with its line number; only LogFormatError is thrown", async () => {
    const { readLogReadings, LogFormatError } = await import("@/ingest/parse-log");
    await fc.assert(
      fc.asyncProperty(file, delim, fc.integer({ min: 1, max: 64 }), async (text, d, size) => {
        const seen: number[] = [];
        try {
          for await (const r of readLogReadings(chunks(text, size), { delimiter: d, timeColumn: "time", timeZone: "UTC", magColumn: "mag", tempColumn: "temp" })) {
            expect(Number.isInteger(r.line) && r.line >= 1).toBe(true);
            seen.push(r.line);
            if ("reason" in r) {
              expect(typeof r.reason).toBe("string");
              expect(r.reason.length).toBeLessThan(600);
            } else {
              expect(Number.isNaN(r.takenAt.getTime())).toBe(false);
              expect(Number.isFinite(r.mag)).toBe(true);
            }
          }
        } catch (err) {
          expect(err, String(err)).toBeInstanceOf(LogFormatError);
        }
        // line numbers only go forward
        for (let i = 1; i < seen.length; i++) expect(seen[i]!).toBeGreaterThan(seen[i - 1]!);
      }),
      { numRuns: 300 },
    );
  });

  it("sniff (the preview) never throws anything but LogFormatError", async () => {
    const { sniff, LogFormatError } = await import("@/ingest/parse-log");
    fc.assert(
      fc.property(file, (text) => {
        try {
          sniff(text, { stationTimeZone: "America/Denver" });
        } catch (err) {
          expect(err, String(err)).toBeInstanceOf(LogFormatError);
        }
      }),
      { numRuns: 300 },
    );
  });
});

describe.skipIf(!hasUploadService)("upload metadata (the multipart mapping field)", () => {
  it("arbitrary strings: a mapping or a 400 with a message", async () => {
    const { parseMappingField } = await import("@/lib/uploads/service");
    const mappingish = fc.oneof(
      fc.string(),
      fc.json(),
      fc.record({ delimiter: fc.oneof(fc.constantFrom(",", ";", "\t", "|"), fc.string()), timeColumn: fc.string(), timeZone: fc.string(), magColumn: fc.string({ maxLength: 300 }), tempColumn: fc.oneof(fc.string(), fc.constant(null)) }, { requiredKeys: [] }).map((o) => JSON.stringify(o)),
    );
    fc.assert(
      fc.property(mappingish, (raw) => {
        try {
          parseMappingField(raw);
        } catch (err) {
          expect(err).toBeInstanceOf(AppError);
          expect((err as AppError).status).toBe(400);
        }
      }),
      { numRuns: 400 },
    );
  }, 60_000);
});
