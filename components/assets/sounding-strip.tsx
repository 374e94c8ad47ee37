import { useFigures } from "@/components/ui/display-settings";
import type { Priority } from "@/components/fleet/fleet-status";
import { priorityGlyph } from "@/components/ui/priority-badge";

// The sounding strip of LOOK.md: a slim vertical scale, the contents as a flat fill up to the surface,
// the setpoints as short labelled ticks on the right, the last 24 hours' minimum–maximum as a bracket
// on the left and the uncertainty as a thin band at the surface. Drawn in SVG, no chart library.

export interface StripSetpoint {
  key: string;
  value_m: number;
  /** The priority of this setpoint's alarm while it needs attention; the tick then takes its colour and glyph. */
  alarm?: Priority | null;
}

const PRIORITY_FILL: Record<Priority, string> = { critical: "fill-critical", high: "fill-high", medium: "fill-medium", low: "fill-low" };
const PRIORITY_STROKE: Record<Priority, string> = { critical: "stroke-critical", high: "stroke-high", medium: "stroke-medium", low: "stroke-low" };

// Drawn at 1:1, so labels are 11 px: readable on a phone in the field.
const LABEL_PX = 11;
const W = 118;
const H = 220;
const TOP = 10;
const BOTTOM = H - 8;
const SCALE_X = 54;
const SCALE_W = 20;

/** Label heights for the setpoint ticks, pushed apart so two close setpoints (HH and H) never overlap. */
function labelRows(ys: number[]): number[] {
  const order = ys.map((y, i) => ({ y, i })).sort((a, b) => a.y - b.y);
  const out = new Array<number>(ys.length);
  let last = -Infinity;
  for (const { y, i } of order) {
    last = Math.max(y, last + LABEL_PX + 1);
    out[i] = last;
  }
  return out;
}

// Scale marks every 0.1 … 10 m (or ft), whichever leaves at most five intervals on the strip.
const STEPS = [0.1, 0.2, 0.25, 0.5, 1, 2, 5, 10];
function scaleStep(span: number): number {
  return STEPS.find((s) => span / s <= 5) ?? Math.ceil(span / 5);
}

export function SoundingStrip({
  heightM,
  levelM,
  uncertaintyM,
  setpoints = [],
  dayRange,
  name,
}: {
  heightM: number;
  levelM: number | null;
  uncertaintyM?: number | null;
  setpoints?: StripSetpoint[];
  dayRange?: [number, number] | null;
  name: string;
}) {
  const fig = useFigures();
  const span = heightM > 0 ? heightM : 1;
  const y = (m: number) => BOTTOM - (Math.min(Math.max(m, 0), span) / span) * (BOTTOM - TOP);
  const surface = levelM == null ? null : y(levelM);
  const band = levelM != null && uncertaintyM ? { top: y(levelM + uncertaintyM), bottom: y(levelM - uncertaintyM) } : null;
  // The scale is marked in the person's unit (m or ft): ticks are round numbers of it.
  const perMetre = fig.levelFromSi(1);
  const step = scaleStep(span * perMetre);
  const ticks = Array.from({ length: Math.floor((span * perMetre) / step + 1e-9) + 1 }, (_, i) => Number((i * step).toFixed(2)));
  const description = [
    levelM == null ? "No level yet" : `Level ${fig.length(levelM, uncertaintyM)} on a ${fig.length(span)} scale`,
    ...setpoints.map((s) => `${s.key.toUpperCase()} at ${fig.length(s.value_m)}${s.alarm ? ` (${s.alarm} alarm)` : ""}`),
    dayRange ? `last 24 h between ${fig.length(dayRange[0])} and ${fig.length(dayRange[1])}` : "",
  ].filter(Boolean);

  const labelYs = labelRows(setpoints.map((s) => y(s.value_m)));
  return (
    <svg viewBox={`0 0 ${W} ${H}`} width={W} height={H} role="img" aria-label={`${name}: ${description.join("; ")}`} className="shrink-0">
      <rect x={SCALE_X} y={TOP} width={SCALE_W} height={BOTTOM - TOP} className="fill-card stroke-rule" strokeWidth={1} />
      {surface != null && <rect x={SCALE_X + 0.5} y={surface} width={SCALE_W - 1} height={BOTTOM - surface} className="fill-liquid" />}
      {ticks.map((m, i) => (
        <g key={m}>
          <line x1={SCALE_X} x2={SCALE_X + 4} y1={y(m / perMetre)} y2={y(m / perMetre)} className="stroke-muted" strokeWidth={1} />
          <text x={SCALE_X - 11} y={y(m / perMetre) + 4} className="fill-muted font-mono text-[11px]" textAnchor="end" aria-hidden="true">
            {fig.number(m, m % 1 === 0 ? 0 : (m * 10) % 1 === 0 ? 1 : 2)}
            {i === ticks.length - 1 ? ` ${fig.levelSymbol}` : ""}
          </text>
        </g>
      ))}
      {band && <rect x={SCALE_X} y={band.top} width={SCALE_W} height={Math.max(1, band.bottom - band.top)} className="fill-ink/25" />}
      {surface != null && <line x1={SCALE_X} x2={SCALE_X + SCALE_W} y1={surface} y2={surface} className="stroke-ink" strokeWidth={1.5} />}
      {dayRange && (
        <path
          d={`M ${SCALE_X - 4} ${y(dayRange[1])} h -4 V ${y(dayRange[0])} h 4`}
          className="fill-none stroke-ink"
          strokeWidth={1}
          aria-hidden="true"
        />
      )}
      {setpoints.map((s, i) => {
        const ty = y(s.value_m);
        const labelY = labelYs[i];
        return (
          <g key={s.key} aria-hidden="true">
            <line x1={SCALE_X + SCALE_W} x2={SCALE_X + SCALE_W + 6} y1={ty} y2={ty} className={s.alarm ? PRIORITY_STROKE[s.alarm] : "stroke-ink"} strokeWidth={s.alarm ? 2 : 1} />
            <text x={SCALE_X + SCALE_W + 8} y={labelY + 4} className={`font-mono text-[11px] ${s.alarm ? `${PRIORITY_FILL[s.alarm]} font-bold` : "fill-muted"}`}>
              {s.key.toUpperCase()}
              {s.alarm ? ` ${priorityGlyph(s.alarm)}` : ""}
            </text>
          </g>
        );
      })}
    </svg>
  );
}
