"use client";

import { useState } from "react";
import { Card, Notice } from "@/components/ui/card";
import { Field, Input } from "@/components/ui/input";
import { RAMP_BANDS, rampClass } from "@/lib/map/ramp";
import { convertAll, LUMINANCE_K_CD_M2, luminanceCdM2ToMag, magDiffToRatio, magFromNelm, NATURAL_SKY_MAG, NELM_ZERO_SKY_LIMIT_MAG } from "@/lib/photometry";
import { cn } from "@/lib/cn";

const SWATCH = ["bg-ramp-0", "bg-ramp-1", "bg-ramp-2", "bg-ramp-3", "bg-ramp-4", "bg-ramp-5", "bg-ramp-6"];

function parse(raw: string, min: number, max: number, what: string): { value: number | null; error?: string } {
  const s = raw.trim().replace(",", ".");
  if (s === "") return { value: null };
  const v = Number(s);
  if (!Number.isFinite(v)) return { value: null, error: `${what} must be a number.` };
  if (v < min || v > max) return { value: null, error: `${what} must be between ${min} and ${max}.` };
  return { value: v };
}

export function ConvertClient() {
  const [mode, setMode] = useState<"mag" | "lum" | "nelm">("mag");
  const [raw, setRaw] = useState("21.5");
  const [raw2, setRaw2] = useState("20.5");

  const limits = { mag: [0, 25, "Sky brightness"], lum: [1e-9, 1e4, "Luminance"], nelm: [-2, NELM_ZERO_SKY_LIMIT_MAG - 0.001, "Limiting magnitude"] } as const;
  const [lo, hi, what] = limits[mode];
  const p = parse(raw, lo, hi, what);
  let mag: number | null = null;
  if (p.value !== null) mag = mode === "mag" ? p.value : mode === "lum" ? luminanceCdM2ToMag(p.value) : magFromNelm(p.value);
  const c = mag !== null && mag >= 0 && mag <= 25 ? convertAll(mag) : null;
  const p2 = parse(raw2, 0, 25, "Second reading");
  const diff = mag !== null && p2.value !== null ? p2.value - mag : null;

  return (
    <div className="grid gap-4 md:grid-cols-2">
      <Card className="flex flex-col gap-4">
        <fieldset className="flex flex-wrap gap-2">
          <legend className="mb-2 text-sm font-bold">I have</legend>
          {(
            [
              ["mag", "mag/arcsec²"],
              ["lum", "luminance, cd/m²"],
              ["nelm", "naked-eye limit"],
            ] as const
          ).map(([m, l]) => (
            <label key={m} className={cn("flex min-h-11 cursor-pointer items-center rounded-lg border px-3 text-sm", mode === m ? "border-accent bg-accent/15" : "border-line")}>
              <input
                type="radio"
                name="mode"
                value={m}
                checked={mode === m}
                onChange={() => {
                  setMode(m);
                  setRaw(m === "mag" ? "21.5" : m === "lum" ? "0.00027" : "6.2");
                }}
                className="sr-only"
              />
              {l}
            </label>
          ))}
        </fieldset>
        <Field label={mode === "mag" ? "Zenith sky brightness (mag/arcsec²)" : mode === "lum" ? "Luminance (cd/m²)" : "Faintest star seen (magnitude)"} htmlFor="conv-value" error={p.error}>
          <Input id="conv-value" inputMode="decimal" value={raw} onChange={(e) => setRaw(e.target.value)} aria-invalid={!!p.error} />
        </Field>
        <Field label="Compare with a second reading (mag/arcsec²)" htmlFor="conv-value2" error={p2.error}>
          <Input id="conv-value2" inputMode="decimal" value={raw2} onChange={(e) => setRaw2(e.target.value)} aria-invalid={!!p2.error} />
        </Field>
        {diff !== null ? (
          <p className="text-sm" data-testid="conv-diff">
            {diff === 0
              ? "The two skies are equally bright."
              : `A difference of ${Math.abs(diff).toFixed(2)} mag: the ${diff < 0 ? "second" : "first"} sky is ${magDiffToRatio(Math.abs(diff)).toFixed(2)}× as bright.`}
          </p>
        ) : null}
      </Card>
      <Card aria-live="polite">
        {c ? (
          <>
            <p className="flex items-center gap-2 font-mono text-3xl font-bold tabular-nums" data-testid="conv-mag">
              <span className={cn("inline-block h-4 w-4 rounded-full border border-fg/60", SWATCH[rampClass(c.input.magArcsec2)])} aria-hidden />
              {c.input.magArcsec2.toFixed(2)} <span className="text-sm font-normal text-muted">mag/arcsec² · {RAMP_BANDS[rampClass(c.input.magArcsec2)]?.words}</span>
            </p>
            <dl className="mt-3 grid grid-cols-[1fr_auto] gap-x-4 gap-y-2 text-sm">
              <dt>Luminance</dt>
              <dd className="text-right font-mono tabular-nums">
                {c.luminanceMcdM2.toPrecision(4)} mcd/m²
                <span className="block text-xs text-muted">{c.luminanceCdM2.toExponential(3)} cd/m²</span>
              </dd>
              <dt>Brightness vs a natural sky ({NATURAL_SKY_MAG.toFixed(1)})</dt>
              <dd className="text-right font-mono tabular-nums">× {c.ratioToNatural.toFixed(2)}</dd>
              <dt>Artificial light as % of natural</dt>
              <dd className="text-right font-mono tabular-nums">{c.artificialPercent.toFixed(1)} %</dd>
              <dt>Naked-eye limiting magnitude</dt>
              <dd className="text-right font-mono tabular-nums">{c.nelm.toFixed(2)}</dd>
              <dt>Bortle class (approximate)</dt>
              <dd className="text-right font-mono tabular-nums">~{c.bortleApprox.label}</dd>
            </dl>
          </>
        ) : (
          <Notice>Enter a value to see what it means.</Notice>
        )}
        <details className="mt-4 text-xs text-muted">
          <summary className="min-h-11 cursor-pointer py-3 font-bold">Formulas and sources</summary>
          <ul className="list-disc pl-5">
            <li>L = K·10^(−0.4·m), K = {LUMINANCE_K_CD_M2.toExponential(2)} cd/m² (V = 0 illuminance 2.54×10⁻⁶ lx, Allen&apos;s Astrophysical Quantities, Cox 2000). Falchi et al. 2016 imply K ≈ 1.098×10⁵; the spectrum changes it (Bará et al. 2020).</li>
            <li>Natural sky 22.0 mag/arcsec² (Falchi et al. 2016, Science Advances 2:e1600377).</li>
            <li>NELM = 7.93 − 5·log₁₀(1 + 10^(4.316 − m/5)), after Schaefer 1990 (PASP 102:212) with Garstang 1986.</li>
            <li>Bortle class (Bortle 2001) from commonly quoted mag ranges: approximate.</li>
            <li>Pogson: 5 magnitudes = ×100, 1 magnitude ≈ ×2.512.</li>
          </ul>
        </details>
      </Card>
    </div>
  );
}
