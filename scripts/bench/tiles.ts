/**
 * Warm tile latency for the demo region at zoom 4–12 against a running app.
 *   APP_URL=http://127.0.0.1:3000 npx tsx scripts/bench/tiles.ts   (npm run bench:tiles)
 * For each demo site and zoom, the 3×3 block of tiles around it: one warm-up pass (builds the
 * indices and fills the cache), then ROUNDS timed passes. Target: p95 < 50 ms.
 */
import { DEMO_POINTS, tileFor } from "../../tests/helpers/tiles";

const APP_URL = process.env.APP_URL ?? "http://127.0.0.1:3000";
const ROUNDS = Number(process.env.ROUNDS ?? 5);
const TARGET_MS = 50;

function pct(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  const i = (sorted.length - 1) * p;
  const lo = Math.floor(i);
  const hi = Math.ceil(i);
  return sorted[lo]! + (sorted[hi]! - sorted[lo]!) * (i - lo);
}

async function time(url: string): Promise<number> {
  const t = performance.now();
  const res = await fetch(url);
  await res.arrayBuffer();
  if (!res.ok) throw new Error(`${url}: HTTP ${res.status}`);
  return performance.now() - t;
}

async function main() {
  const urls = new Map<number, string[]>();
  for (let z = 4; z <= 12; z++) {
    const list: string[] = [];
    for (const [lon, lat] of DEMO_POINTS) {
      const c = tileFor(lon, lat, z);
      for (let dx = -1; dx <= 1; dx++) for (let dy = -1; dy <= 1; dy++) list.push(`${APP_URL}/api/tiles/${z}/${c.x + dx}/${c.y + dy}`);
    }
    urls.set(z, list);
  }
  const cold = performance.now();
  for (const list of urls.values()) for (const u of list) await time(u);
  console.log(`warm-up (cold) pass: ${(performance.now() - cold).toFixed(0)} ms for ${[...urls.values()].flat().length} tiles`);

  const all: number[] = [];
  console.log("zoom  tiles  p50 ms  p95 ms");
  for (const [z, list] of urls) {
    const times: number[] = [];
    for (let r = 0; r < ROUNDS; r++) for (const u of list) times.push(await time(u));
    times.sort((a, b) => a - b);
    all.push(...times);
    console.log(`${String(z).padStart(4)}  ${String(list.length).padStart(5)}  ${pct(times, 0.5).toFixed(1).padStart(6)}  ${pct(times, 0.95).toFixed(1).padStart(6)}`);
  }
  all.sort((a, b) => a - b);
  const p95 = pct(all, 0.95);
  console.log(`all   ${String(all.length).padStart(5)}  ${pct(all, 0.5).toFixed(1).padStart(6)}  ${p95.toFixed(1).padStart(6)}   target p95 < ${TARGET_MS} ms: ${p95 < TARGET_MS ? "met" : "NOT met"}`);
  if (p95 >= TARGET_MS) process.exitCode = 1;
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
