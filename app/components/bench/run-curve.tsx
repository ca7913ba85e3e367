// The run's curve so far, drawn as inline SVG by the app (no chart library on the bench).

type Point = { cut: number; value: number; confirmation: number | null; atOrAbove: boolean };

export function RunCurve({ points, threshold, cap, unit, label }: { points: Point[]; threshold: number | null; cap: number; unit: string; label: string }) {
  const W = 560;
  const H = 240;
  const pad = { l: 52, r: 16, t: 16, b: 36 };
  const values = points.flatMap((p) => [p.value, p.confirmation ?? p.value]);
  const top = Math.max(threshold ?? 0, ...values, 1) * 1.1;
  const right = Math.max(cap, 1);
  const x = (c: number) => pad.l + (c / right) * (W - pad.l - pad.r);
  const y = (v: number) => H - pad.b - (v / top) * (H - pad.t - pad.b);
  const ticks = [0, 0.25, 0.5, 0.75, 1].map((f) => Math.round(top * f));
  const path = points.map((p, i) => `${i ? "L" : "M"}${x(p.cut).toFixed(1)},${y(p.value).toFixed(1)}`).join(" ");
  const last = points[points.length - 1];
  return (
    <figure className="rounded-lg border border-rule bg-card p-3">
      <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label={label} className="h-auto w-full" data-testid="run-curve">
        {ticks.map((t) => (
          <g key={t}>
            <line x1={pad.l} x2={W - pad.r} y1={y(t)} y2={y(t)} stroke="var(--color-rule)" strokeWidth="1" />
            <text x={pad.l - 6} y={y(t) + 4} textAnchor="end" fontSize="12" fill="var(--color-graphite-600)" className="figures">
              {t}
            </text>
          </g>
        ))}
        <line x1={pad.l} x2={W - pad.r} y1={H - pad.b} y2={H - pad.b} stroke="var(--color-graphite-600)" />
        <text x={pad.l} y={H - 10} fontSize="12" fill="var(--color-graphite-600)">0</text>
        <text x={W - pad.r} y={H - 10} fontSize="12" textAnchor="end" fill="var(--color-graphite-600)">
          {right} {unit === "mm" ? "strokes" : "cuts"}
        </text>
        {threshold !== null ? (
          <g>
            <line x1={pad.l} x2={W - pad.r} y1={y(threshold)} y2={y(threshold)} stroke="var(--color-signal)" strokeWidth="2" strokeDasharray="8 5" />
            <text x={W - pad.r} y={y(threshold) - 6} textAnchor="end" fontSize="13" fontWeight="700" fill="var(--color-signal)">
              threshold {threshold} {unit}
            </text>
          </g>
        ) : null}
        {path ? <path d={path} fill="none" stroke="var(--color-ink)" strokeWidth="3" /> : null}
        {points.map((p) => (
          <g key={p.cut}>
            {p.atOrAbove ? (
              <rect x={x(p.cut) - 6} y={y(p.value) - 6} width="12" height="12" fill="var(--color-signal)" />
            ) : (
              <circle cx={x(p.cut)} cy={y(p.value)} r="5" fill="var(--color-ink)" />
            )}
            {p.confirmation !== null ? (
              <path d={`M${x(p.cut)},${y(p.confirmation) - 7} l7,12 h-14 z`} fill="none" stroke="var(--color-signal)" strokeWidth="2" />
            ) : null}
          </g>
        ))}
        {last ? (
          <text x={Math.min(x(last.cut) + 8, W - pad.r - 40)} y={y(last.value) - 10} fontSize="13" fontWeight="700" fill="var(--color-graphite-950)" className="figures">
            {Math.round(last.value * 10) / 10}
          </text>
        ) : null}
      </svg>
      <figcaption className="mt-1 text-sm text-graphite-600">
        {unit === "mm" ? "Card cut so far (mm) by stroke." : `Each check's aggregate (${unit}) by cut; ■ at or above the threshold, △ confirmation reading.`}
      </figcaption>
    </figure>
  );
}
