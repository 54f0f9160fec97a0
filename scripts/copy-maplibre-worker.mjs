#!/usr/bin/env node
// Copies MapLibre's worker bundle into public/ so the client can call
// setWorkerUrl("/maplibre-gl-worker.mjs") (Turbopack cannot bundle the worker itself).
import { copyFileSync, existsSync, mkdirSync, readFileSync, statSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";

const root = resolve(dirname(fileURLToPath(import.meta.url)), "..");
const src = join(root, "node_modules/maplibre-gl/dist/maplibre-gl-worker.mjs");
const dest = join(root, "public/maplibre-gl-worker.mjs");

if (!existsSync(src)) {
  console.error(`[nightmark] maplibre worker not found at ${src} (run npm ci)`);
  process.exit(1);
}

const same =
  existsSync(dest) &&
  statSync(dest).size === statSync(src).size &&
  readFileSync(dest).equals(readFileSync(src));
if (same) {
  console.log("[nightmark] maplibre worker up to date in public/");
} else {
  mkdirSync(dirname(dest), { recursive: true });
  copyFileSync(src, dest);
  console.log("[nightmark] copied maplibre worker to public/maplibre-gl-worker.mjs");
}
