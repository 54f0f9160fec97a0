/** Slippy-map tile arithmetic for tests and benchmarks (Web Mercator, as MapLibre uses). */
export function tileFor(lon: number, lat: number, z: number): { z: number; x: number; y: number } {
  const n = 2 ** z;
  const x = Math.floor(((lon + 180) / 360) * n);
  const r = (lat * Math.PI) / 180;
  const y = Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * n);
  return { z, x: Math.min(n - 1, Math.max(0, x)), y: Math.min(n - 1, Math.max(0, y)) };
}

/** Centres of the demo scenario's three sites (db/seed/scenario.ts): Utah, Arizona, northern California. */
export const DEMO_POINTS: [number, number][] = [
  [-111.42, 37.91],
  [-111.78, 34.62],
  [-122.04, 40.62],
];
