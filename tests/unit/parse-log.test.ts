/**
 * The logger-file reader (ingest/parse-log.ts): delimiters, line endings, BOM, `#` metadata,
 * quoting, local time across daylight-saving changes, broken lines with their line numbers, and
 * bounded memory. Files here are invented generic delimited text.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  LogFormatError,
  MAX_LINE_CHARS,
  readLogReadings,
  readLogRows,
  sniff,
  splitFields,
  wallClockResolver,
  parseTimeValue,
  type LogMapping,
  type LogReading,
  type LogRow,
} from "@/ingest/parse-log";

async function collect<T>(it: AsyncIterable<T>): Promise<T[]> {
  const out: T[] = [];
  for await (const x of it) out.push(x);
  return out;
}

/** Feeds text as bytes in pieces of `size` bytes (cutting through characters and CRLF pairs). */
async function* bytesOf(text: string, size = 7): AsyncGenerator<Uint8Array> {
  const b = new TextEncoder().encode(text);
  for (let i = 0; i < b.length; i += size) yield b.subarray(i, i + size);
}

const readings = (text: string, mapping: LogMapping, size?: number) => collect(readLogReadings(bytesOf(text, size), mapping));
const ok = (r: LogReading[]) => r.filter((x): x is Extract<LogReading, { mag: number }> => "mag" in x);
const bad = (r: LogReading[]) => r.filter((x): x is { line: number; reason: string } => "reason" in x);

const BASE_ROWS = [
  ["2025-01-05T05:00:00Z", "21.31", "-2.5"],
  ["2025-01-05T05:01:00Z", "21.33", "-2.6"],
  ["2025-01-05T05:02:00Z", "21.30", ""],
];

function fileWith(delimiter: string, eol: string) {
  return ["# device: bench meter 3", "# note: invented", ["time (UTC)", "mag", "temp"].join(delimiter), ...BASE_ROWS.map((r) => r.join(delimiter))].join(eol) + eol;
}

describe("delimiters and line endings", () => {
  for (const [name, d] of [["comma", ","], ["semicolon", ";"], ["tab", "\t"]] as const) {
    for (const eol of ["\n", "\r\n"]) {
      it(`reads a ${name}-separated file with ${eol === "\n" ? "LF" : "CRLF"}`, async () => {
        const text = fileWith(d, eol);
        const s = sniff(text, { stationTimeZone: "America/Denver" });
        expect(s.delimiter).toBe(d);
        expect(s.columns).toEqual(["time (UTC)", "mag", "temp"]);
        expect(s.metadata).toEqual({ device: "bench meter 3", note: "invented" });
        expect(s.headerLine).toBe(3);
        expect(s.guessedMapping).toEqual({ timeColumn: "time (UTC)", timeZone: "UTC", magColumn: "mag", tempColumn: "temp" });
        const r = await readings(text, { delimiter: d, timeColumn: "time (UTC)", timeZone: "UTC", magColumn: "mag", tempColumn: "temp" });
        expect(r).toEqual([
          { line: 4, takenAt: new Date("2025-01-05T05:00:00Z"), mag: 21.31, tempC: -2.5 },
          { line: 5, takenAt: new Date("2025-01-05T05:01:00Z"), mag: 21.33, tempC: -2.6 },
          { line: 6, takenAt: new Date("2025-01-05T05:02:00Z"), mag: 21.3, tempC: null },
        ]);
      });
    }
  }

  it("reads a decimal comma in a semicolon-separated file", async () => {
    const text = "time;mag;temp\n2025-01-05 05:00:00;21,31;-2,5\n";
    const r = await readings(text, { delimiter: ";", timeColumn: "time", timeZone: "UTC", magColumn: "mag", tempColumn: "temp" });
    expect(r).toEqual([{ line: 2, takenAt: new Date("2025-01-05T05:00:00Z"), mag: 21.31, tempC: -2.5 }]);
  });

  it("drops a UTF-8 BOM, whether given as text or as bytes split inside it", async () => {
    const text = "\uFEFFtime,mag\r\n2025-01-05T05:00:00Z,21.5\r\n";
    expect(sniff(text).columns).toEqual(["time", "mag"]);
    expect(sniff(new TextEncoder().encode(text), { complete: true }).columns).toEqual(["time", "mag"]);
    for (const size of [1, 2, 3, 5]) {
      const rows = await collect(readLogRows(bytesOf(text, size)));
      expect(rows).toEqual([{ line: 2, values: ["2025-01-05T05:00:00Z", "21.5"] }]);
    }
  });

  it("gives the same rows whatever the chunk size (multi-byte characters and CRLF cut in two)", async () => {
    const text = "# Ort: Höhe 2100 m — °C\r\nZeit (UTC);Helligkeit;Temperatur °C\r\n2025-01-05 05:00:00;21,31;-2,5\r\n2025-01-05 05:01:00;21,33;-2,6\r\n";
    const whole = await collect(readLogRows(bytesOf(text, 1 << 20)));
    for (const size of [1, 2, 3, 4, 7, 13]) expect(await collect(readLogRows(bytesOf(text, size)))).toEqual(whole);
    expect(sniff(text).metadata).toEqual({ Ort: "Höhe 2100 m — °C" });
  });

  it("reads a last line without a line break", async () => {
    const rows = await collect(readLogRows(bytesOf("time,mag\n2025-01-05T05:00:00Z,21.5")));
    expect(rows).toEqual([{ line: 2, values: ["2025-01-05T05:00:00Z", "21.5"] }]);
  });
});

describe("# lines, header, quoting", () => {
  it("counts # lines, empty lines and the header in the line numbers", async () => {
    const text = "# a: 1\n#comment without a colon\n\ntime,mag\n# a note in the middle\n2025-01-05T05:00:00Z,21.5\n\n2025-01-05T05:01:00Z,21.6\n";
    const s = sniff(text);
    expect(s.metadata).toEqual({ a: "1" });
    expect(s.headerLine).toBe(4);
    expect((await collect(readLogRows(bytesOf(text)))).map((r) => r.line)).toEqual([6, 8]);
  });

  it("splits quoted fields with delimiters and doubled quotes inside", () => {
    expect(splitFields('"2025-01-05 05:00:00","21.5","roof, north ""A"""', ",")).toEqual(["2025-01-05 05:00:00", "21.5", 'roof, north "A"']);
    expect(splitFields('a;"b;c";d', ";")).toEqual(["a", "b;c", "d"]);
    expect(splitFields('"x"\t"y"', "\t")).toEqual(["x", "y"]);
    expect(typeof splitFields('"open,2', ",")).toBe("string");
  });

  it("reads a quoted header and quoted values", async () => {
    const text = '"time","mag, mpsas","remark"\n"2025-01-05T05:00:00Z","21.5","dew, light"\n';
    const s = sniff(text);
    expect(s.columns).toEqual(["time", "mag, mpsas", "remark"]);
    expect(s.guessedMapping.magColumn).toBe("mag, mpsas");
    const r = await readings(text, { delimiter: ",", timeColumn: "time", timeZone: "UTC", magColumn: "mag, mpsas" });
    expect(r).toEqual([{ line: 2, takenAt: new Date("2025-01-05T05:00:00Z"), mag: 21.5, tempC: null }]);
  });

  it("names the columns of a file without a header row and reads its first row as data", async () => {
    const text = "2025-01-05T05:00:00Z,21.5,3.1\n2025-01-05T05:01:00Z,21.6,3.0\n";
    const s = sniff(text);
    expect(s.hasHeader).toBe(false);
    expect(s.columns).toEqual(["column 1", "column 2", "column 3"]);
    expect(s.guessedMapping).toMatchObject({ timeColumn: "column 1", timeZone: "UTC", magColumn: "column 2" });
    expect((await collect(readLogRows(bytesOf(text)))).map((r) => r.line)).toEqual([1, 2]);
  });

  it("refuses a file with no header row, saying why", () => {
    expect(() => sniff("# only: metadata\n\n")).toThrow(LogFormatError);
    expect(() => sniff("")).toThrow(/empty/);
    expect(() => sniff("just one column\n1\n")).toThrow(/line 1 .*no comma, semicolon or tab/);
  });

  it("guesses UTC when a UTC column exists beside a local one, else the station's zone", () => {
    const both = "local time,UTC time,mag\n2025-01-05 22:00:00,2025-01-06 05:00:00,21.5\n";
    expect(sniff(both, { stationTimeZone: "America/Denver" }).guessedMapping).toMatchObject({ timeColumn: "UTC time", timeZone: "UTC" });
    const local = "time,mag\n2025-01-05 22:00:00,21.5\n";
    expect(sniff(local, { stationTimeZone: "America/Denver" }).guessedMapping).toMatchObject({ timeColumn: "time", timeZone: "America/Denver" });
    const zulu = "when,mag\n2025-01-05T22:00:00Z,21.5\n";
    expect(sniff(zulu, { stationTimeZone: "America/Denver" }).guessedMapping).toMatchObject({ timeColumn: "when", timeZone: "UTC" });
  });

  it("keeps 20 sample rows and ignores a cut-off last line of a partial sample", () => {
    const lines = ["time,mag", ...Array.from({ length: 30 }, (_, i) => `2025-01-05T05:${String(i).padStart(2, "0")}:00Z,21.${i}`)];
    const s = sniff(lines.join("\n") + "\n");
    expect(s.sampleRows).toHaveLength(20);
    expect(s.sampleRows[0]!.line).toBe(2);
    const partial = sniff("time,mag\n2025-01-05T05:00:00Z,21.5\n2025-01-05T05:01:00Z,2", { complete: false });
    expect(partial.sampleRows.map((r) => r.values)).toEqual([["2025-01-05T05:00:00Z", "21.5"]]);
  });
});

describe("local time across daylight-saving changes (America/Denver)", () => {
  // US rule since 2007 (Energy Policy Act of 2005, 15 U.S.C. § 260a): DST starts at 02:00 local on the
  // second Sunday of March and ends at 02:00 local on the first Sunday of November; Mountain Time is
  // UTC−7 (MST) and UTC−6 (MDT). In 2024 those Sundays are 10 March and 3 November.
  const zone = "America/Denver";
  const map: LogMapping = { delimiter: ",", timeColumn: "local", timeZone: zone, magColumn: "mag" };

  /** The UTC offset that Intl (ICU's time-zone data, independent of our resolver) gives an instant. */
  function intlOffset(d: Date): string {
    const part = new Intl.DateTimeFormat("en-US", { timeZone: zone, timeZoneName: "longOffset" }).formatToParts(d).find((p) => p.type === "timeZoneName");
    return part!.value; // "GMT-06:00"
  }
  /** The wall-clock time Intl shows for an instant in the zone, as YYYY-MM-DD HH:MM:SS. */
  const wallFormat = new Intl.DateTimeFormat("en-CA", { timeZone: zone, year: "numeric", month: "2-digit", day: "2-digit", hour: "2-digit", minute: "2-digit", second: "2-digit", hourCycle: "h23" });
  function intlWall(d: Date): string {
    const p = Object.fromEntries(
      wallFormat
        .formatToParts(d)
        .map((x) => [x.type, x.value]),
    );
    return `${p.year}-${p.month}-${p.day} ${p.hour}:${p.minute}:${p.second}`;
  }

  it("rejects times in the spring-forward gap and places those around it", async () => {
    const text = [
      "local,mag",
      "2024-03-10 01:59:00,21.5",
      "2024-03-10 02:00:00,21.5",
      "2024-03-10 02:30:00,21.5",
      "2024-03-10 02:59:59,21.5",
      "2024-03-10 03:00:00,21.5",
    ].join("\n");
    const r = await readings(text, map);
    expect(bad(r)).toEqual([
      { line: 3, reason: 'time "2024-03-10 02:00:00" does not exist in America/Denver (DST change)' },
      { line: 4, reason: 'time "2024-03-10 02:30:00" does not exist in America/Denver (DST change)' },
      { line: 5, reason: 'time "2024-03-10 02:59:59" does not exist in America/Denver (DST change)' },
    ]);
    const good = ok(r);
    expect(good.map((x) => x.takenAt.toISOString())).toEqual(["2024-03-10T08:59:00.000Z", "2024-03-10T09:00:00.000Z"]);
    expect(good.map((x) => intlOffset(x.takenAt))).toEqual(["GMT-07:00", "GMT-06:00"]);
    // 01:59 MST and 03:00 MDT are one minute apart.
    expect(good[1]!.takenAt.getTime() - good[0]!.takenAt.getTime()).toBe(60_000);
  });

  it("resolves the repeated hour at fall-back to the earlier instant (MDT, UTC−6), as documented", async () => {
    const text = ["local,mag", "2024-11-03 00:59:00,21.5", "2024-11-03 01:00:00,21.5", "2024-11-03 01:30:00,21.5", "2024-11-03 01:59:00,21.5", "2024-11-03 02:00:00,21.5"].join("\r\n");
    const r = ok(await readings(text, map));
    expect(r.map((x) => x.takenAt.toISOString())).toEqual([
      "2024-11-03T06:59:00.000Z",
      "2024-11-03T07:00:00.000Z",
      "2024-11-03T07:30:00.000Z",
      "2024-11-03T07:59:00.000Z",
      "2024-11-03T09:00:00.000Z",
    ]);
    expect(r.map((x) => intlOffset(x.takenAt))).toEqual(["GMT-06:00", "GMT-06:00", "GMT-06:00", "GMT-06:00", "GMT-07:00"]);
    // The other reading of 01:30 (MST) is one hour later and shows the same wall time.
    expect(intlWall(new Date(r[2]!.takenAt.getTime() + 3_600_000))).toBe("2024-11-03 01:30:00");
  });

  it("round-trips every hour of 2024 (every 5 minutes on the change days) through Intl's wall clock, except the gap", () => {
    const resolve = wallClockResolver(zone);
    let gaps = 0;
    const walls: number[] = [];
    for (let ms = Date.UTC(2024, 0, 1); ms < Date.UTC(2025, 0, 1); ms += 3_600_000) walls.push(ms);
    for (const day of [Date.UTC(2024, 2, 10), Date.UTC(2024, 10, 3)]) for (let ms = day; ms < day + 86_400_000; ms += 5 * 60_000) walls.push(ms);
    for (const ms of walls) {
      const wall = new Date(ms).toISOString().slice(0, 19).replace("T", " ");
      const t = parseTimeValue(wall, zone, resolve);
      if (typeof t === "string") {
        gaps++;
        expect(wall.startsWith("2024-03-10 02:")).toBe(true);
        continue;
      }
      expect(intlWall(t)).toBe(wall);
    }
    expect(gaps).toBe(1 + 12); // 02:00 in the hourly walk, 02:00…02:55 in the 5-minute one
  });

  it("takes an explicit offset as given, whatever the zone", async () => {
    const r = ok(await readings("local,mag\n2024-11-03T01:30:00-07:00,21.5\n2024-11-03 01:30:00 +0100,21.5\n", map));
    expect(r.map((x) => x.takenAt.toISOString())).toEqual(["2024-11-03T08:30:00.000Z", "2024-11-03T00:30:00.000Z"]);
  });
});

describe("broken lines", () => {
  it("reports each with its line number and a reason", async () => {
    const text = [
      "# logger: invented", // 1
      "time;mag;temp", // 2
      "2025-01-05 05:00:00;21,5;1,0", // 3 ok
      "2025-01-05 05:01:00;21,5", // 4 too few fields
      "2025-01-05 05:02:00;abc;1,0", // 5 mag not a number
      "05/01/2025 05:03;21,5;1,0", // 6 bad time
      "2025-02-30 05:04:00;21,5;1,0", // 7 impossible date
      "2025-01-05 05:05:00;21,5;warm", // 8 temp not a number
      "2025-01-05 05:06:00;;1,0", // 9 empty mag
      '2025-01-05 05:07:00;"21,5;1,0', // 10 unclosed quote
      "2025-01-05 05:08:00;21,5;1,0;9", // 11 too many fields
      "2025-01-05 05:09:00;21,5;1,0;", // 12 ok: a trailing delimiter
    ].join("\r\n");
    const r = await readings(text, { delimiter: ";", timeColumn: "time", timeZone: "UTC", magColumn: "mag", tempColumn: "temp" });
    expect(ok(r).map((x) => x.line)).toEqual([3, 12]);
    const b = bad(r);
    expect(b.map((x) => x.line)).toEqual([4, 5, 6, 7, 8, 9, 10, 11]);
    expect(b[0]!.reason).toBe("2 fields where the header has 3 (semicolon-separated)");
    expect(b[1]!.reason).toBe('brightness "abc" ("mag") is not a number');
    expect(b[2]!.reason).toMatch(/^time "05\/01\/2025 05:03" is not a date-time/);
    expect(b[3]!.reason).toBe('time "2025-02-30 05:04:00" is not a real date and time');
    expect(b[4]!.reason).toBe('temperature "warm" ("temp") is not a number');
    expect(b[5]!.reason).toBe('the brightness ("mag") is empty');
    expect(b[6]!.reason).toMatch(/quoted field .* not closed on this line/);
    expect(b[7]!.reason).toBe("4 fields where the header has 3 (semicolon-separated)");
  });

  it("refuses a mapping that names a column the file does not have", async () => {
    await expect(readings("time,mag\n2025-01-05T05:00:00Z,21.5\n", { delimiter: ",", timeColumn: "when", timeZone: "UTC", magColumn: "mag" })).rejects.toThrow(
      /time column "when" is not in the file \(its columns: time, mag\)/,
    );
  });

  it("refuses an overlong line without holding it, and goes on after it", async () => {
    async function* huge(): AsyncGenerator<string> {
      yield "time,mag\n";
      const block = "x".repeat(1 << 16);
      for (let i = 0; i < 200; i++) yield block; // 13 MB without a line break
      yield "\n2025-01-05T05:00:00Z,21.5\n";
    }
    const before = process.memoryUsage().heapUsed;
    const rows = await collect(readLogRows(huge()));
    expect(rows).toEqual([
      { line: 2, reason: `the line is longer than ${MAX_LINE_CHARS} characters` },
      { line: 3, values: ["2025-01-05T05:00:00Z", "21.5"] },
    ]);
    expect(process.memoryUsage().heapUsed - before).toBeLessThan(8 * 1024 * 1024);
  });

  it("streams a long file in constant memory", async () => {
    const N = 300_000;
    async function* many(): AsyncGenerator<string> {
      yield "time,mag,temp\n";
      for (let i = 0; i < N; i += 1000) {
        let s = "";
        for (let j = i; j < i + 1000; j++) s += `${new Date(Date.UTC(2025, 0, 1) + j * 60_000).toISOString()},21.${j % 90},${(j % 20) - 5}\n`;
        yield s;
      }
    }
    global.gc?.();
    const before = process.memoryUsage().heapUsed;
    let n = 0;
    let peak = 0;
    for await (const r of readLogReadings(many(), { delimiter: ",", timeColumn: "time", timeZone: "UTC", magColumn: "mag", tempColumn: "temp" })) {
      if ("reason" in r) throw new Error(r.reason);
      if (++n % 50_000 === 0) peak = Math.max(peak, process.memoryUsage().heapUsed - before);
    }
    expect(n).toBe(N);
    // Holding 300,000 readings would take well over 50 MB; streaming keeps it to garbage between collections.
    expect(peak).toBeLessThan(50 * 1024 * 1024);
  });
});

describe("property: garbage never throws, every line is accounted for", () => {
  it("each non-empty, non-# line after the header is a row or a rejection with its own line number", async () => {
    const junk = fc.oneof(
      fc.string({ maxLength: 60 }),
      fc.constantFrom('"', '""', ",,,", ";", "\t", "#x", "\uFEFF", "\r", "2025-01-05T05:00:00Z,21.5,1", "2024-03-10 02:30:00,21,1", '"a,b",1,2'),
      fc.array(fc.constantFrom("2025-01-05 05:00:00", "21.5", "", "x", '"q"', "NaN", "1e400", "-0"), { maxLength: 5 }).map((a) => a.join(",")),
    );
    await fc.assert(
      fc.asyncProperty(fc.array(junk, { maxLength: 40 }), fc.constantFrom("\n", "\r\n"), fc.integer({ min: 1, max: 9 }), async (lines, eol, size) => {
        // No line breaks inside a generated line: each array item is one line of the file.
        const body = lines.map((l) => l.replace(/[\r\n]/g, " "));
        const text = ["time,mag,temp", ...body].join(eol) + eol;
        const mapping: LogMapping = { delimiter: ",", timeColumn: "time", timeZone: "America/Denver", magColumn: "mag", tempColumn: "temp" };
        const out = await readings(text, mapping, size);
        const expected = body
          .map((l, i) => ({ l, line: i + 2 }))
          .filter(({ l, line }) => {
            const t = (line === 1 ? l.replace(/^\uFEFF/, "") : l).trim();
            return t !== "" && !t.startsWith("#");
          })
          .map((x) => x.line);
        expect(out.map((r) => r.line)).toEqual(expected);
        for (const r of out) {
          if ("reason" in r) expect(r.reason.length).toBeGreaterThan(0);
          else {
            expect(Number.isFinite(r.takenAt.getTime())).toBe(true);
            expect(Number.isFinite(r.mag)).toBe(true);
          }
        }
        const rows: LogRow[] = await collect(readLogRows(bytesOf(text, size)));
        expect(rows.map((r) => r.line)).toEqual(expected);
      }),
      { numRuns: 300 },
    );
  });
});
