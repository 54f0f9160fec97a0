/**
 * Screening throughput: naive (suncalc per reading) vs the shared per-minute cache.
 * `npx tsx scripts/bench/screening.ts [readings=500000] [runs=3]`
 *
 * Workload: 100 stations spread over the globe, 5,000 consecutive whole minutes each (≈ 3.5 days),
 * i.e. the shape of a network's ingest. The cached run starts from an empty cache every time, so its
 * figure includes computing the knots. Also measured: the same readings at random seconds
 * (interpolated between knots) and the largest difference from the naive results.
 */
import { performance } from "node:perf_hooks";
import {
  createSkyCache,
  naiveSkyAt,
  screenBatch,
  skyAt,
} from "../../ingest/screening/sky-positions";
import { mulberry32 } from "../../db/seed/model";

const total = Number(process.argv[2] ?? 500_000);
const runs = Number(process.argv[3] ?? 3);
const stations = 100;
const perStation = Math.ceil(total / stations);
const rand = mulberry32(42);
const places = Array.from({ length: stations }, () => ({
  latDeg: rand() * 120 - 60,
  lonDeg: rand() * 360 - 180,
}));
const t0 = Date.UTC(2025, 2, 1);
const wholeTimes = Array.from({ length: perStation }, (_, i) => new Date(t0 + i * 60_000));
const oddTimes = Array.from(
  { length: perStation },
  (_, i) => new Date(t0 + i * 60_000 + Math.floor(rand() * 60_000)),
);

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1]!;
}

let sink = 0;
function runNaive(times: Date[]): number {
  const start = performance.now();
  for (const p of places)
    for (const d of times) sink += naiveSkyAt(d, p.latDeg, p.lonDeg).sunAltDeg;
  return (stations * times.length) / ((performance.now() - start) / 1000);
}
function runCached(times: Date[]): number {
  const cache = createSkyCache();
  const start = performance.now();
  // Time-major, as an ingest of many stations' batches for the same minutes sees it.
  for (const d of times)
    for (const p of places) sink += skyAt(cache, d, p.latDeg, p.lonDeg).sunAltDeg;
  return (stations * times.length) / ((performance.now() - start) / 1000);
}
function runBatch(times: Date[]): number {
  const cache = createSkyCache();
  const readings = times.map((takenAt) => ({ takenAt, mag: 21 }));
  const start = performance.now();
  for (const p of places) sink += screenBatch(cache, p, readings)[0]!.flags;
  return (stations * times.length) / ((performance.now() - start) / 1000);
}

const results: Record<string, number[]> = {
  "naive, whole minutes": [],
  "cached skyAt, whole minutes": [],
  "cached screenBatch (+flags), whole minutes": [],
  "naive, random seconds": [],
  "cached skyAt, random seconds (interpolated)": [],
};
for (let r = 0; r < runs; r++) {
  results["naive, whole minutes"]!.push(runNaive(wholeTimes));
  results["cached skyAt, whole minutes"]!.push(runCached(wholeTimes));
  results["cached screenBatch (+flags), whole minutes"]!.push(runBatch(wholeTimes));
  results["naive, random seconds"]!.push(runNaive(oddTimes));
  results["cached skyAt, random seconds (interpolated)"]!.push(runCached(oddTimes));
}

// Largest difference from the naive computation on a sample.
const cache = createSkyCache();
let maxDiff = 0;
for (let i = 0; i < 20_000; i++) {
  const p = places[i % stations]!;
  const d = oddTimes[(i * 7) % oddTimes.length]!;
  const a = skyAt(cache, d, p.latDeg, p.lonDeg);
  const b = naiveSkyAt(d, p.latDeg, p.lonDeg);
  maxDiff = Math.max(
    maxDiff,
    Math.abs(a.sunAltDeg - b.sunAltDeg),
    Math.abs(a.moonAltDeg - b.moonAltDeg),
  );
}

console.log(
  `${stations * perStation} readings, ${runs} runs, median readings/s (node ${process.version})`,
);
const naive = median(results["naive, whole minutes"]!);
for (const [name, xs] of Object.entries(results)) {
  const m = median(xs);
  console.log(
    `${name.padEnd(46)} ${Math.round(m).toLocaleString("en-US").padStart(12)}  (×${(m / naive).toFixed(1)})`,
  );
}
console.log(`max |cached − naive| at random seconds: ${maxDiff.toExponential(2)}°`);
if (sink === 42) console.log("");
