import type { Config } from "tailwindcss";

/**
 * Nightmark's design tokens. Every colour is a CSS variable (app/globals.css) so the red-only
 * night mode can swap the whole palette without touching components.
 */
const token = (name: string) => `rgb(var(--nm-${name}) / <alpha-value>)`;

const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}", "./lib/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        bg: token("bg"),
        surface: token("surface"),
        raised: token("raised"),
        line: token("line"),
        fg: token("fg"),
        muted: token("muted"),
        accent: token("accent"),
        "accent-fg": token("accent-fg"),
        ok: token("ok"),
        warn: token("warn"),
        danger: token("danger"),
        ramp: {
          0: token("ramp-0"),
          1: token("ramp-1"),
          2: token("ramp-2"),
          3: token("ramp-3"),
          4: token("ramp-4"),
          5: token("ramp-5"),
          6: token("ramp-6"),
        },
      },
      fontFamily: {
        sans: ["var(--font-sans)", "system-ui", "sans-serif"],
        mono: ["var(--font-mono)", "ui-monospace", "monospace"],
      },
      borderRadius: { card: "0.75rem" },
    },
  },
};

export default config;
