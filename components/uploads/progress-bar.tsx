import { cn } from "@/lib/cn";

export type ProgressBarProps = { label: string; value: number; max: number; detail?: string; className?: string };

/** A labelled progress bar that screen readers announce (role="progressbar" with its values). */
export function ProgressBar({ label, value, max, detail, className }: ProgressBarProps) {
  const pct = max > 0 ? Math.min(100, Math.max(0, (value / max) * 100)) : 0;
  return (
    <div className={cn("flex flex-col gap-1", className)}>
      <div className="flex flex-wrap items-baseline justify-between gap-2 text-sm">
        <span className="font-bold">{label}</span>
        <span className="font-mono text-muted">{detail ?? `${Math.floor(pct)} %`}</span>
      </div>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={Math.floor(pct)}
        aria-valuetext={detail ?? `${Math.floor(pct)} percent`}
        className="h-3 w-full overflow-hidden rounded-full border border-line bg-raised"
      >
        <div className="h-full bg-accent transition-[width] duration-300" style={{ width: `${pct}%` }} />
      </div>
    </div>
  );
}

export function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} KB`;
  return `${(n / (1024 * 1024)).toFixed(1)} MB`;
}
