"use client";

import { useActionState, useState } from "react";
import type { AlertRuleKind } from "@/db/schema/alerts";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input, Select } from "@/components/ui/input";
import type { FormState } from "@/lib/people/form-state";
import { createDefaultRulesAction, saveRuleAction } from "./actions";

type ParamField = { name: string; label: string; hint?: string; step?: string; unit?: string };

const FIELDS: Record<AlertRuleKind, ParamField[]> = {
  darkening_vs_baseline: [
    { name: "thresholdMag", label: "Brighter by at least", unit: "mag/arcsec²", step: "0.01" },
    { name: "recentNights", label: "Recent usable nights", step: "1" },
    { name: "minBaselineNights", label: "Fewest baseline nights", step: "1" },
  ],
  brightening_trend: [
    {
      name: "minSlopeMagPerYear",
      label: "Slope steeper than",
      unit: "mag/arcsec² per year (entered as a positive number)",
      step: "0.005",
    },
    {
      name: "alpha",
      label: "Significance level α",
      hint: "Mann–Kendall two-sided p must be below this.",
      step: "0.01",
    },
    { name: "minNights", label: "Fewest usable nights", step: "1" },
    { name: "minDistinctMonths", label: "Fewest different months", step: "1" },
  ],
  below_target: [
    { name: "nights", label: "Median of the last usable nights", step: "1" },
    { name: "marginMag", label: "Margin below the target", unit: "mag/arcsec²", step: "0.01" },
  ],
  station_silent: [
    {
      name: "silentNights",
      label: "Missed nights",
      hint: "Counted among the nights the station normally reports on.",
      step: "1",
    },
  ],
  sudden_step: [
    { name: "thresholdMag", label: "Step of at least", unit: "mag/arcsec² brighter", step: "0.01" },
    { name: "windowNights", label: "Window", unit: "usable nights on each side", step: "1" },
    { name: "lookbackNights", label: "Look back over", unit: "nights", step: "1" },
  ],
};

const CLEAR: ParamField = {
  name: "clearAfterNights",
  label: "Clear after",
  unit: "consecutive nights without the condition",
  step: "1",
};

type Baseline =
  | { kind: "years-back"; years: number }
  | { kind: "year"; year: number }
  | { kind: "period"; from: string; to: string };

export function RuleForm({
  rule,
  title,
  description,
}: {
  rule: { id: string; kind: AlertRuleKind; enabled: boolean; params: Record<string, unknown> };
  title: string;
  description: string;
}) {
  const [state, action, pending] = useActionState(saveRuleAction, {} as FormState);
  const baseline = rule.params.baseline as Baseline | undefined;
  const [baselineKind, setBaselineKind] = useState(
    state.values?.["p.baseline.kind"] ?? baseline?.kind ?? "years-back",
  );
  const id = (n: string) => `${rule.id}-${n}`;
  const value = (n: string, fallback: unknown) =>
    state.values?.[`p.${n}`] ?? String(fallback ?? "");
  return (
    <form action={action} className="flex flex-col gap-3" aria-label={`Rule: ${title}`}>
      <input type="hidden" name="ruleId" value={rule.id} />
      <p className="text-muted text-sm">{description}</p>
      {state.ok ? <Notice tone="ok">{state.ok}</Notice> : null}
      {state.error ? <Notice tone="danger">{state.error}</Notice> : null}
      <label className="flex min-h-11 items-center gap-3 font-bold">
        <input
          type="checkbox"
          name="enabled"
          defaultChecked={state.values ? state.values.enabled === "on" : rule.enabled}
          className="accent-accent size-5"
        />
        Enabled
      </label>
      <div className="grid gap-3 sm:grid-cols-2">
        {[...FIELDS[rule.kind], CLEAR].map((f) => (
          <Field
            key={f.name}
            label={f.unit ? `${f.label} (${f.unit})` : f.label}
            htmlFor={id(f.name)}
            error={state.fieldErrors?.[f.name]}
            hint={f.hint}
          >
            <Input
              id={id(f.name)}
              name={`p.${f.name}`}
              type="number"
              inputMode="decimal"
              step={f.step ?? "any"}
              required
              defaultValue={value(f.name, rule.params[f.name])}
              aria-invalid={state.fieldErrors?.[f.name] ? true : undefined}
              aria-describedby={
                state.fieldErrors?.[f.name]
                  ? `${id(f.name)}-error`
                  : f.hint
                    ? `${id(f.name)}-hint`
                    : undefined
              }
            />
          </Field>
        ))}
      </div>
      {rule.kind === "darkening_vs_baseline" ? (
        <fieldset className="border-line grid gap-3 rounded-lg border p-3 sm:grid-cols-2">
          <legend className="px-1 text-sm font-bold">Baseline</legend>
          <Field label="Compare with" htmlFor={id("bk")} error={state.fieldErrors?.baseline}>
            <Select
              id={id("bk")}
              name="p.baseline.kind"
              value={baselineKind}
              onChange={(e) => setBaselineKind(e.target.value as Baseline["kind"])}
            >
              <option value="years-back">The same dates some years earlier</option>
              <option value="year">The same dates in a chosen year</option>
              <option value="period">A fixed baseline period</option>
            </Select>
          </Field>
          {baselineKind === "years-back" ? (
            <Field label="Years earlier" htmlFor={id("by")}>
              <Input
                id={id("by")}
                name="p.baseline.years"
                type="number"
                min={1}
                max={10}
                step="1"
                defaultValue={value(
                  "baseline.years",
                  baseline?.kind === "years-back" ? baseline.years : 1,
                )}
              />
            </Field>
          ) : baselineKind === "year" ? (
            <Field label="Baseline year" htmlFor={id("byr")}>
              <Input
                id={id("byr")}
                name="p.baseline.year"
                type="number"
                min={1990}
                max={2100}
                step="1"
                required
                defaultValue={value(
                  "baseline.year",
                  baseline?.kind === "year" ? baseline.year : new Date().getFullYear() - 1,
                )}
              />
            </Field>
          ) : (
            <>
              <Field label="From" htmlFor={id("bf")}>
                <Input
                  id={id("bf")}
                  name="p.baseline.from"
                  type="date"
                  required
                  defaultValue={value(
                    "baseline.from",
                    baseline?.kind === "period" ? baseline.from : "",
                  )}
                />
              </Field>
              <Field label="To" htmlFor={id("bt")}>
                <Input
                  id={id("bt")}
                  name="p.baseline.to"
                  type="date"
                  required
                  defaultValue={value(
                    "baseline.to",
                    baseline?.kind === "period" ? baseline.to : "",
                  )}
                />
              </Field>
            </>
          )}
        </fieldset>
      ) : null}
      <div>
        <Button type="submit" disabled={pending}>
          {pending ? "Saving…" : "Save rule"}
        </Button>
      </div>
    </form>
  );
}

export function CreateDefaultsForm({ slug, label }: { slug: string; label: string }) {
  const [state, action, pending] = useActionState(createDefaultRulesAction, {} as FormState);
  return (
    <form action={action} className="flex flex-col gap-2">
      <input type="hidden" name="slug" value={slug} />
      {state.ok ? <Notice tone="ok">{state.ok}</Notice> : null}
      {state.error ? <Notice tone="danger">{state.error}</Notice> : null}
      <div>
        <Button type="submit" variant="secondary" disabled={pending}>
          {pending ? "Adding…" : label}
        </Button>
      </div>
    </form>
  );
}
