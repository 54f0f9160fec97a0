/**
 * An invented logger file for the demo and for tests: nights from the seeded model
 * (db/seed/model.ts) written as generic comma-separated text with `#` metadata lines, a UTC column
 * and a local-time column. Not any real logger's format. Yields the file line by line (with LF), so
 * a year at minute cadence never has to sit in memory.
 */
import { DateTime } from "luxon";
import { addDays } from "@/ingest/night";
import { simulateStationRange, type SimStation } from "./model";

export type DemoLogOptions = {
  station: SimStation & { name: string };
  seed: number;
  baseMag: number;
  fromNight: string;
  toNight: string;
  cadenceMin?: number;
  /** Drop readings after this instant (a file is written after its last reading). */
  notAfter?: Date;
};

export function* demoLogLines(o: DemoLogOptions): Generator<string> {
  yield `# station: ${o.station.name}\n`;
  yield `# position: ${o.station.lat.toFixed(4)}, ${o.station.lon.toFixed(4)}\n`;
  yield `# time zone: ${o.station.timeZone}\n`;
  yield `# nights: ${o.fromNight} to ${o.toNight}\n`;
  yield `# written by: Nightmark demo generator (a model, not measurements)\n`;
  yield "UTC time,local time,brightness (mag/arcsec²),temperature (°C)\n";
  const limit = o.notAfter?.getTime() ?? Number.POSITIVE_INFINITY;
  for (const { readings } of simulateStationRange({
    station: o.station,
    seed: o.seed,
    baseMag: o.baseMag,
    startDate: o.fromNight,
    fromNight: o.fromNight,
    toNight: o.toNight,
    cadenceMin: o.cadenceMin ?? 1,
  })) {
    let out = "";
    for (const r of readings) {
      const ms = r.takenAt.getTime();
      if (ms > limit) continue;
      const local = DateTime.fromMillis(ms, { zone: o.station.timeZone }).toFormat("yyyy-MM-dd HH:mm:ss");
      out += `${r.takenAt.toISOString().slice(0, 19)}Z,${local},${r.mag.toFixed(2)},${r.tempC.toFixed(1)}\n`;
    }
    if (out) yield out;
  }
}

/** The nights of the last `count` evenings before `now` in a zone. */
export function lastNights(now: Date, timeZone: string, count: number): { fromNight: string; toNight: string } {
  const today = DateTime.fromJSDate(now, { zone: timeZone }).toISODate()!;
  const toNight = addDays(today, -1);
  return { fromNight: addDays(toNight, -(count - 1)), toNight };
}
