/**
 * Alert conditions: given a site's nightly values (lib/trends/site-trend.ts), its stations' reported
 * nights and one rule, whether the condition holds and what to tell the steward. Pure.
 *
 * `active` is true (condition holds), false (it does not: counts toward clearing) or null (cannot
 * tell yet, e.g. too few nights: neither opens nor clears anything).
 *
 * "Station silent" counts only nights the station would normally have reported: the gap since its
 * last report (calendar nights up to the last complete night) is weighted by the share of nights it
 * reported in the 30 nights up to its last report (at least 1 in 10). A station that reports every
 * night is silent after 5 nights; one that reports every other night after 10. Nights with readings
 * count as reported even when none were usable (cloud, moon): the meter was talking.
 */
import type { AlertRuleKind } from "@/db/schema/alerts";
import { addDays } from "@/ingest/night";
import { median } from "@/lib/stats/robust";
import {
  brighterPercent,
  compareWithBaseline,
  dayNumber,
  largestStep,
  siteTrend,
  type NightValue,
} from "@/lib/trends/site-trend";
import { baselineLabel, type RuleParams } from "./rules";

export type StationReports = { id: string; name: string; slug: string; reportedNights: string[] };

export type ConditionInput = {
  values: NightValue[];
  targetMag: number;
  stations: StationReports[];
  /** The last complete night at the site (YYYY-MM-DD). */
  referenceNight: string;
};

export type Outcome = {
  targetKey: string;
  stationId: string | null;
  active: boolean | null;
  summary: string;
  details: Record<string, unknown>;
  /** The night this outcome is about: the latest site night, or the reference night for stations. */
  night: string | null;
};

const f2 = (v: number) => v.toFixed(2);
const pct = (v: number) => `${Math.abs(v) < 10 ? v.toFixed(1) : v.toFixed(0)} %`;

function siteOutcome(
  active: boolean | null,
  summary: string,
  details: Record<string, unknown>,
  values: NightValue[],
): Outcome {
  return {
    targetKey: "site",
    stationId: null,
    active,
    summary,
    details,
    night: values[values.length - 1]?.night ?? null,
  };
}

export function evaluateCondition<K extends AlertRuleKind>(
  kind: K,
  params: RuleParams[K],
  input: ConditionInput,
): Outcome[] {
  const { values } = input;
  switch (kind) {
    case "darkening_vs_baseline": {
      const p = params as RuleParams["darkening_vs_baseline"];
      const c = compareWithBaseline(values, {
        recentNights: p.recentNights,
        baseline: p.baseline,
        minBaselineNights: p.minBaselineNights,
      });
      if (c.status !== "ok") return [siteOutcome(null, c.message, { reason: c.message }, values)];
      const active = c.diffMag <= -p.thresholdMag;
      const summary = `The median of the last ${c.recent.nights} usable nights (${c.recent.from} to ${c.recent.to}) is ${f2(c.recent.medianMag)} mag/arcsec², ${f2(Math.abs(c.diffMag))} mag ${c.diffMag < 0 ? "brighter" : "darker"} (${pct(Math.abs(c.brighterPercent))} ${c.diffMag < 0 ? "more light" : "less light"}) than ${baselineLabel(p.baseline)} (${f2(c.baseline.medianMag)}, ${c.baseline.nights} nights).`;
      return [
        siteOutcome(
          active,
          summary,
          {
            what: "darkening_vs_baseline",
            diffMag: c.diffMag,
            brighterPercent: c.brighterPercent,
            thresholdMag: p.thresholdMag,
            since: c.recent.from,
            recent: c.recent,
            baseline: c.baseline,
          },
          values,
        ),
      ];
    }
    case "brightening_trend": {
      const p = params as RuleParams["brightening_trend"];
      const t = siteTrend(values, {
        alpha: p.alpha,
        minNights: p.minNights,
        minDistinctMonths: p.minDistinctMonths,
      });
      if (t.status !== "ok") return [siteOutcome(null, t.message, { reason: t.message }, values)];
      const active = t.mannKendall.p < p.alpha && t.slopeMagPerYear <= -p.minSlopeMagPerYear;
      const summary = `Theil–Sen slope ${t.slopeMagPerYear.toFixed(3)} mag/arcsec² per year (${pct(t.brighteningPercentPerYear)} ${t.slopeMagPerYear < 0 ? "brighter" : "darker"} a year; ${Math.round((1 - p.alpha) * 100)} % interval ${t.lowerMagPerYear.toFixed(3)} to ${t.upperMagPerYear.toFixed(3)}), Mann–Kendall p = ${t.mannKendall.p.toPrecision(2)}, over ${t.nights} nights since ${t.firstNight}.`;
      return [
        siteOutcome(
          active,
          summary,
          {
            what: "brightening_trend",
            slopeMagPerYear: t.slopeMagPerYear,
            lowerMagPerYear: t.lowerMagPerYear,
            upperMagPerYear: t.upperMagPerYear,
            brighteningPercentPerYear: t.brighteningPercentPerYear,
            p: t.mannKendall.p,
            z: t.mannKendall.z,
            seasonal: t.seasonal,
            nights: t.nights,
            since: t.firstNight,
            minSlopeMagPerYear: p.minSlopeMagPerYear,
            alpha: p.alpha,
          },
          values,
        ),
      ];
    }
    case "below_target": {
      const p = params as RuleParams["below_target"];
      if (values.length < p.nights) {
        const msg = `Not enough nights yet: ${values.length} of the ${p.nights} usable nights needed.`;
        return [siteOutcome(null, msg, { reason: msg }, values)];
      }
      const recent = values.slice(-p.nights);
      const m = median(recent.map((v) => v.mag));
      const diff = m - input.targetMag;
      const active = diff < -p.marginMag;
      const summary = `The median of the last ${recent.length} usable nights (${recent[0]!.night} to ${recent[recent.length - 1]!.night}) is ${f2(m)} mag/arcsec², ${f2(Math.abs(diff))} mag ${diff < 0 ? "below" : "above"} the target ${f2(input.targetMag)} (${pct(Math.abs(brighterPercent(diff)))} ${diff < 0 ? "brighter" : "darker"} than the target).`;
      return [
        siteOutcome(
          active,
          summary,
          {
            what: "below_target",
            medianMag: m,
            targetMag: input.targetMag,
            diffMag: diff,
            brighterPercent: brighterPercent(diff),
            since: recent[0]!.night,
            to: recent[recent.length - 1]!.night,
          },
          values,
        ),
      ];
    }
    case "sudden_step": {
      const p = params as RuleParams["sudden_step"];
      const sinceNight = addDays(input.referenceNight, -p.lookbackNights);
      const step = largestStep(values, {
        windowNights: p.windowNights,
        sinceNight,
        direction: "brighter",
      });
      if (!step) {
        const msg = `Not enough nights yet: ${values.length} of the ${2 * p.windowNights} usable nights needed.`;
        return [siteOutcome(null, msg, { reason: msg }, values)];
      }
      const active = step.shiftMag <= -p.thresholdMag;
      const summary = `A step of ${step.shiftMag.toFixed(2)} mag (${pct(brighterPercent(step.shiftMag))} brighter) around ${step.night}: the ${p.windowNights} usable nights from ${step.after.from} have a median of ${f2(step.after.medianMag)} mag/arcsec² against ${f2(step.before.medianMag)} for the ${p.windowNights} before.`;
      return [
        siteOutcome(
          active,
          summary,
          {
            what: "sudden_step",
            shiftMag: step.shiftMag,
            brighterPercent: brighterPercent(step.shiftMag),
            since: step.night,
            before: step.before,
            after: step.after,
            thresholdMag: p.thresholdMag,
          },
          values,
        ),
      ];
    }
    case "station_silent": {
      const p = params as RuleParams["station_silent"];
      return input.stations.map((st): Outcome => {
        const base = { targetKey: st.id, stationId: st.id, night: input.referenceNight };
        const nights = [...new Set(st.reportedNights)].sort();
        const last = nights[nights.length - 1];
        if (!last)
          return {
            ...base,
            active: null,
            summary: `${st.name} has not reported yet.`,
            details: { station: st.slug },
          };
        const gap = Math.max(0, Math.round(dayNumber(input.referenceNight) - dayNumber(last)));
        const windowStart = addDays(last, -29);
        const reported = nights.filter((n) => n >= windowStart && n <= last).length;
        const rate = Math.max(0.1, reported / 30);
        const missed = gap * rate;
        const active = missed >= p.silentNights;
        const summary =
          gap === 0
            ? `${st.name} reported on the last night (${last}).`
            : `${st.name} has not reported since ${last}: ${gap} night${gap === 1 ? "" : "s"}; it reported on ${reported} of the 30 nights before, so about ${missed.toFixed(1)} expected reports are missing.`;
        return {
          ...base,
          active,
          summary,
          details: {
            what: "station_silent",
            station: st.slug,
            stationName: st.name,
            lastReport: last,
            gapNights: gap,
            reportedOf30: reported,
            expectedMissed: missed,
            since: addDays(last, 1),
          },
        };
      });
    }
  }
  return [];
}
