/**
 * A small server-rendered curve of one night: brightness against time, darker up. Usable readings
 * are drawn as filled dots on the line, the others as hollow dots, so the difference is not colour
 * alone. Colours are design tokens (stroke-/fill- classes), so night mode turns it red.
 */
export function NightSparkline({ points, label }: { points: [number, number, boolean][]; label: string }) {
  const W = 300;
  const H = 64;
  const xs = points.map((p) => p[0]);
  const ms = points.map((p) => p[1]);
  const x0 = Math.min(...xs);
  const x1 = Math.max(...xs);
  const lo = Math.min(...ms);
  const hi = Math.max(...ms);
  const sx = (x: number) => (x1 === x0 ? W / 2 : ((x - x0) / (x1 - x0)) * (W - 4) + 2);
  // Inverted: larger mag (darker) is higher.
  const sy = (m: number) => (hi === lo ? H / 2 : H - 3 - ((m - lo) / (hi - lo)) * (H - 6));
  const d = points.map((p, i) => `${i === 0 ? "M" : "L"}${sx(p[0]).toFixed(1)},${sy(p[1]).toFixed(1)}`).join(" ");
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="h-auto w-full" role="img" aria-label={label}>
      <path d={d} className="fill-none stroke-line" strokeWidth={1} vectorEffect="non-scaling-stroke" />
      {points.map((p) =>
        p[2] ? (
          <circle key={p[0]} cx={sx(p[0])} cy={sy(p[1])} r={1.6} className="fill-ok" />
        ) : (
          <circle key={p[0]} cx={sx(p[0])} cy={sy(p[1])} r={1.4} className="fill-none stroke-muted" strokeWidth={0.8} />
        ),
      )}
    </svg>
  );
}
