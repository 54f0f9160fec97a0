/**
 * Alert rule kinds, their parameters (one zod schema per kind) and the defaults every site gets.
 * Pure module: used by the evaluator, the rules page and its server action.
 *
 * Defaults (issue #5):
 * - darkening_vs_baseline: the median of the last 30 usable nights is ≥ 0.2 mag brighter than the
 *   same calendar window a year earlier (or a fixed baseline period).
 * - brightening_trend: Mann–Kendall p < 0.05 and a Theil–Sen slope steeper than −0.03 mag/yr.
 * - below_target: the median of the last 30 usable nights is below the site's target.
 * - station_silent: an approved, active station has not reported for 5 of the nights it would
 *   normally have reported (see lib/alerts/conditions.ts for how "would normally" is counted).
 * - sudden_step: within the last 180 nights, the largest brightening between two adjacent windows
 *   of 14 usable nights is ≥ 0.25 mag (dated by the first night after the change).
 * Every rule clears after `clearAfterNights` consecutive new nights without the condition (7; 1 for
 * station_silent, which ends when the station reports again).
 */
import { z } from "zod";
import type { AlertRuleKind } from "@/db/schema/alerts";

const night = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, "Use a date as YYYY-MM-DD.");
const clearAfter = z.coerce
  .number()
  .int()
  .min(1, "At least 1 night.")
  .max(60, "At most 60 nights.");

const baselineSchema = z.discriminatedUnion("kind", [
  z.object({
    kind: z.literal("years-back"),
    years: z.coerce.number().int().min(1).max(10).default(1),
  }),
  z.object({ kind: z.literal("year"), year: z.coerce.number().int().min(1990).max(2100) }),
  z
    .object({ kind: z.literal("period"), from: night, to: night })
    .refine((v) => v.from <= v.to, {
      path: ["to"],
      message: "The end must not be before the start.",
    }),
]);

export const RULE_PARAM_SCHEMAS = {
  darkening_vs_baseline: z.object({
    thresholdMag: z.coerce.number().min(0.01, "At least 0.01 mag.").max(5, "At most 5 mag."),
    recentNights: z.coerce.number().int().min(5, "At least 5 nights.").max(365),
    baseline: baselineSchema,
    minBaselineNights: z.coerce.number().int().min(3).max(365).default(10),
    clearAfterNights: clearAfter,
  }),
  brightening_trend: z.object({
    alpha: z.coerce.number().gt(0, "Above 0.").lt(0.5, "Below 0.5."),
    minSlopeMagPerYear: z.coerce.number().min(0, "0 or more.").max(2, "At most 2 mag/yr."),
    minNights: z.coerce.number().int().min(10).max(5000).default(30),
    minDistinctMonths: z.coerce.number().int().min(1).max(120).default(6),
    clearAfterNights: clearAfter,
  }),
  below_target: z.object({
    nights: z.coerce.number().int().min(5, "At least 5 nights.").max(365),
    marginMag: z.coerce.number().min(0).max(2).default(0),
    clearAfterNights: clearAfter,
  }),
  station_silent: z.object({
    silentNights: z.coerce.number().int().min(1, "At least 1 night.").max(120),
    clearAfterNights: clearAfter,
  }),
  sudden_step: z.object({
    thresholdMag: z.coerce.number().min(0.05, "At least 0.05 mag.").max(5),
    windowNights: z.coerce.number().int().min(3, "At least 3 nights.").max(60),
    lookbackNights: z.coerce.number().int().min(14).max(730),
    clearAfterNights: clearAfter,
  }),
} satisfies Record<AlertRuleKind, z.ZodType>;

export type RuleParams = { [K in AlertRuleKind]: z.infer<(typeof RULE_PARAM_SCHEMAS)[K]> };

export const DEFAULT_RULE_PARAMS: RuleParams = {
  darkening_vs_baseline: {
    thresholdMag: 0.2,
    recentNights: 30,
    baseline: { kind: "years-back", years: 1 },
    minBaselineNights: 10,
    clearAfterNights: 7,
  },
  brightening_trend: {
    alpha: 0.05,
    minSlopeMagPerYear: 0.03,
    minNights: 30,
    minDistinctMonths: 6,
    clearAfterNights: 7,
  },
  below_target: { nights: 30, marginMag: 0, clearAfterNights: 7 },
  station_silent: { silentNights: 5, clearAfterNights: 1 },
  sudden_step: { thresholdMag: 0.25, windowNights: 14, lookbackNights: 180, clearAfterNights: 7 },
};

export const RULE_KIND_ORDER: AlertRuleKind[] = [
  "darkening_vs_baseline",
  "brightening_trend",
  "below_target",
  "sudden_step",
  "station_silent",
];

export const RULE_LABELS: Record<AlertRuleKind, { title: string; describe: (p: never) => string }> =
  {
    darkening_vs_baseline: {
      title: "Brighter than the baseline",
      describe: (p: RuleParams["darkening_vs_baseline"]) =>
        `The median of the last ${p.recentNights} usable nights is at least ${p.thresholdMag} mag brighter than ${baselineLabel(p.baseline)}.`,
    },
    brightening_trend: {
      title: "Brightening trend",
      describe: (p: RuleParams["brightening_trend"]) =>
        `A Mann–Kendall trend significant at α = ${p.alpha} with a Theil–Sen slope steeper than −${p.minSlopeMagPerYear} mag/arcsec² per year (needs ${p.minNights} nights in ${p.minDistinctMonths} months).`,
    },
    below_target: {
      title: "Below the site's target",
      describe: (p: RuleParams["below_target"]) =>
        `The median of the last ${p.nights} usable nights is below the site's target darkness${p.marginMag ? ` by more than ${p.marginMag} mag` : ""}.`,
    },
    station_silent: {
      title: "Station silent",
      describe: (p: RuleParams["station_silent"]) =>
        `An approved station has not reported for ${p.silentNights} of the nights it normally reports on (its share of nights reported in the 30 nights before it went quiet).`,
    },
    sudden_step: {
      title: "Sudden step",
      describe: (p: RuleParams["sudden_step"]) =>
        `Within the last ${p.lookbackNights} nights, ${p.windowNights} usable nights are at least ${p.thresholdMag} mag brighter than the ${p.windowNights} before them.`,
    },
  } as never;

export function baselineLabel(b: RuleParams["darkening_vs_baseline"]["baseline"]): string {
  if (b.kind === "period") return `the baseline period ${b.from} to ${b.to}`;
  if (b.kind === "year") return `the same dates in ${b.year}`;
  return b.years === 1
    ? "the same dates a year earlier"
    : `the same dates ${b.years} years earlier`;
}

/** Parses a rule's stored or submitted params; throws ZodError with field paths. */
export function parseRuleParams<K extends AlertRuleKind>(kind: K, params: unknown): RuleParams[K] {
  return RULE_PARAM_SCHEMAS[kind].parse(params) as RuleParams[K];
}

/** Stored params that no longer parse (hand-edited, older shape) fall back to the defaults merged under them. */
export function safeRuleParams<K extends AlertRuleKind>(kind: K, params: unknown): RuleParams[K] {
  const merged = { ...DEFAULT_RULE_PARAMS[kind], ...((params as object) ?? {}) };
  const r = RULE_PARAM_SCHEMAS[kind].safeParse(merged);
  return (r.success ? r.data : DEFAULT_RULE_PARAMS[kind]) as RuleParams[K];
}
