// The site screen's small trend of the last day: one thin ink line, no axes (the figures beside it
// carry the values), broken where a bucket had no valid reading or none came for longer than maxGapMs.

export function Sparkline({ points, from, to, label, maxGapMs = 2 * 3600_000 }: { points: [number, number | null][]; from: number; to: number; label: string; maxGapMs?: number }) {
  const W = 160;
  const H = 36;
  const values = points.map(([, v]) => v).filter((v): v is number => v != null);
  if (values.length < 2) return <p className="text-xs text-muted">Not enough data for a trend yet.</p>;
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  const span = hi - lo || 1;
  const x = (ms: number) => ((ms - from) / (to - from)) * W;
  const y = (v: number) => H - 2 - ((v - lo) / span) * (H - 4);
  // A missing bucket breaks the line rather than bridging it.
  const runs: string[] = [];
  let current: string[] = [];
  let lastMs = -Infinity;
  for (const [ms, value] of points) {
    const gap = ms - lastMs > maxGapMs;
    lastMs = ms;
    if (gap && current.length) {
      runs.push(current.join(" "));
      current = [];
    }
    if (value == null) {
      if (current.length) runs.push(current.join(" "));
      current = [];
      continue;
    }
    current.push(`${x(ms).toFixed(1)},${y(value).toFixed(1)}`);
  }
  if (current.length) runs.push(current.join(" "));
  return (
    <svg viewBox={`0 0 ${W} ${H}`} width={W} height={H} role="img" aria-label={label} className="block max-w-full">
      <rect x={0} y={0} width={W} height={H} className="fill-paper" />
      {runs.map((r, i) => <polyline key={i} points={r} className="fill-none stroke-ink" strokeWidth={1.2} />)}
    </svg>
  );
}
