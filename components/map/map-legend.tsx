import { RAMP_BANDS, rampRadiusPx } from "@/lib/map/ramp";
import { cn } from "@/lib/cn";

const SWATCH = ["bg-ramp-0", "bg-ramp-1", "bg-ramp-2", "bg-ramp-3", "bg-ramp-4", "bg-ramp-5", "bg-ramp-6"];

export type MapLegendProps = { className?: string };

/** The darkness ramp in mag/arcsec², with the circle size that goes with each class (colour is never the only cue). */
export function MapLegend({ className }: MapLegendProps) {
  return (
    <figure className={cn("text-sm", className)} aria-labelledby="map-legend-title">
      <figcaption id="map-legend-title" className="mb-2 font-bold">
        Zenith sky brightness, mag/arcsec²
        <span className="block text-xs font-normal text-muted">bigger number = darker sky; brighter skies draw bigger circles</span>
      </figcaption>
      <ul className="flex flex-col gap-1">
        {[...RAMP_BANDS].reverse().map((b) => {
          const d = rampRadiusPx(b.class) * 2;
          return (
            <li key={b.class} className="flex items-center gap-2">
              <span className="flex w-6 justify-center" aria-hidden>
                <span className={cn("inline-block rounded-full border border-fg/70", SWATCH[b.class])} style={{ width: d, height: d }} />
              </span>
              <span className="w-20 font-mono tabular-nums">{b.label}</span>
              <span className="text-muted">{b.words}</span>
            </li>
          );
        })}
        <li className="flex items-center gap-2">
          <span className="flex w-6 justify-center" aria-hidden>
            <span className="inline-block h-3 w-3 rounded-full border-2 border-muted" />
          </span>
          <span className="w-20">no data</span>
          <span className="text-muted">no usable night in the period</span>
        </li>
        <li className="flex items-center gap-2">
          <span className="flex w-6 justify-center" aria-hidden>
            <span className="inline-block h-3 w-3 rotate-45 border-2 border-ramp-3" />
          </span>
          <span className="w-20">◇ survey</span>
          <span className="text-muted">handheld field-survey spot</span>
        </li>
        <li className="flex items-center gap-2">
          <span className="flex w-6 justify-center" aria-hidden>
            <span className="inline-block h-3 w-5 border-2 border-accent bg-accent/25" />
          </span>
          <span className="w-20">site</span>
          <span className="text-muted">site boundary</span>
        </li>
      </ul>
    </figure>
  );
}
