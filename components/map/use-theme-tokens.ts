"use client";

import { useSyncExternalStore } from "react";

export const TOKEN_NAMES = ["bg", "surface", "raised", "line", "fg", "muted", "accent", "ok", "warn", "danger"] as const;
export type TokenName = (typeof TOKEN_NAMES)[number];

export type ThemeTokens = {
  theme: string;
  /** "r g b" triplets as the CSS variables hold them. */
  raw: Record<string, [number, number, number]>;
  /** Solid colours by token name (and ramp-0 … ramp-6). */
  color: Record<string, string>;
  ramp: string[];
  rgba: (token: string, alpha: number) => string;
};

function readTokens(): ThemeTokens {
  const cs = getComputedStyle(document.documentElement);
  const raw: Record<string, [number, number, number]> = {};
  const names = [...TOKEN_NAMES, ...Array.from({ length: 7 }, (_, i) => `ramp-${i}`)];
  for (const n of names) {
    const parts = cs.getPropertyValue(`--nm-${n}`).trim().split(/[\s,]+/).map(Number);
    raw[n] = parts.length >= 3 && parts.every(Number.isFinite) ? [parts[0]!, parts[1]!, parts[2]!] : [128, 128, 128];
  }
  const color = Object.fromEntries(Object.entries(raw).map(([k, [r, g, b]]) => [k, `rgb(${r}, ${g}, ${b})`]));
  const rgba = (token: string, alpha: number) => {
    const [r, g, b] = raw[token] ?? [128, 128, 128];
    return `rgba(${r}, ${g}, ${b}, ${alpha})`;
  };
  return {
    theme: document.documentElement.dataset.theme ?? "dark",
    raw,
    color,
    ramp: Array.from({ length: 7 }, (_, i) => color[`ramp-${i}`]!),
    rgba,
  };
}

let snapshot: ThemeTokens | null = null;

function subscribe(onChange: () => void): () => void {
  const obs = new MutationObserver(() => {
    snapshot = readTokens();
    onChange();
  });
  obs.observe(document.documentElement, { attributes: true, attributeFilter: ["data-theme", "class", "style"] });
  return () => obs.disconnect();
}

function getSnapshot(): ThemeTokens {
  if (!snapshot || snapshot.theme !== (document.documentElement.dataset.theme ?? "dark")) snapshot = readTokens();
  return snapshot;
}

/**
 * The design tokens' computed values, re-read whenever the theme changes (the night-mode toggle
 * sets data-theme on <html>), so canvas-drawn things (the map, charts) follow the red-only night mode.
 * null while rendering on the server.
 */
export function useThemeTokens(): ThemeTokens | null {
  return useSyncExternalStore(subscribe, getSnapshot, () => null);
}
