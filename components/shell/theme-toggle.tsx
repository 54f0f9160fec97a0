"use client";

import { useEffect, useState } from "react";

/** Switches the red-only night mode; remembered in a cookie so the server renders it without a flash. */
export function ThemeToggle() {
  const [night, setNight] = useState(false);
  useEffect(() => setNight(document.documentElement.dataset.theme === "night"), []);
  function toggle() {
    const next = !night;
    setNight(next);
    document.documentElement.dataset.theme = next ? "night" : "dark";
    document.cookie = `nm-theme=${next ? "night" : "dark"}; path=/; max-age=31536000; samesite=lax`;
  }
  return (
    <button
      type="button"
      onClick={toggle}
      aria-pressed={night}
      className="min-h-11 rounded-lg border border-line px-3 text-sm font-bold hover:bg-raised"
      title="Red-only night mode keeps your eyes adapted to the dark"
    >
      {night ? "Night mode: on" : "Night mode: off"}
    </button>
  );
}
