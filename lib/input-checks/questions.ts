// Questions to ask before storing what a person typed or imported: a dip dated in the future or before
// the tank had any data, a dip deeper than the tank, a temperature sample far from its neighbours (often
// a °F value in a °C column), a mounting height that puts the sensor inside the tank or the tank bottom
// beyond the transducer's range. Pure: the caller passes now and the asset's facts; messages name the
// numbers through the caller's formatter, so they appear in the viewer's units.

import { toSi } from "../units/units";

export type Severity = "refuse" | "warn";

export interface Question {
  field: string;
  severity: Severity;
  message: string;
}

/** Writes a length for a message; the default is metres to the millimetre. */
export type LengthWriter = (metres: number) => string;
const metres: LengthWriter = (m) => `${m.toFixed(3)} m`;

// ── Dips ──────────────────────────────────────────────────────────────────────────────────────────

/** A phone's clock a few minutes off is not a dip in the future, nor one before the tank was added (own choice: 5 min). */
export const DIP_CLOCK_SLACK_MS = 5 * 60 * 1000;

export interface DipDateFacts {
  now: Date;
  /** When the asset was added. */
  assetCreatedAt: Date;
  /** Its earliest stored measurement, when backfilled readings go further back than the asset. */
  earliestDataAt?: Date | null;
}

/** A dip's time must lie between the asset's first data (or its creation) and now. */
export function dipDateQuestion(at: Date, facts: DipDateFacts): Question | null {
  if (at.getTime() > facts.now.getTime() + DIP_CLOCK_SLACK_MS) {
    return { field: "at", severity: "refuse", message: "The dip is dated in the future; check its date, time and time zone." };
  }
  const start = Math.min(facts.assetCreatedAt.getTime(), facts.earliestDataAt?.getTime() ?? Infinity);
  if (at.getTime() < start - DIP_CLOCK_SLACK_MS) {
    return { field: "at", severity: "refuse", message: "The dip is dated before this tank had any data in Halftrip; check its date." };
  }
  return null;
}

/** A dip reads between the bottom and the tank's full height. */
export function dipLevelQuestion(levelM: number, tankHeightM: number | null, write: LengthWriter = metres): Question | null {
  if (!Number.isFinite(levelM) || levelM < 0) return { field: "level_m", severity: "refuse", message: "The dipped level counts up from the tank bottom: 0 or more." };
  if (tankHeightM !== null && levelM > tankHeightM) {
    return { field: "level_m", severity: "refuse", message: `The tank is ${write(tankHeightM)} deep; a dip reads at most that.` };
  }
  return null;
}

// ── Temperature samples ───────────────────────────────────────────────────────────────────────────

/**
 * A sample is questioned when it lies further than this from the median of its neighbours, plus their
 * own range (so a day's swing between sparse samples is not questioned). Own choice: outdoor air seldom
 * jumps 10 K between neighbouring samples.
 */
export const SAMPLE_JUMP_K = 10;
/** A questioned sample "looks like °F" when, read as °F, it lands this near its neighbours (plus half their range). */
export const FAHRENHEIT_MATCH_K = 3;
/** Neighbours considered on each side, and how far in time they may lie. */
const NEIGHBOURS_EACH_SIDE = 2;
const NEIGHBOUR_MAX_GAP_MS = 6 * 3600 * 1000;

export interface TemperatureSampleInput {
  at: Date;
  airTempC: number;
}

export interface SampleQuestion extends Question {
  /** Index in the samples as given. */
  index: number;
  looksLikeFahrenheit: boolean;
  /** The median of its neighbours, °C. */
  neighboursC: number;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
}

/** Samples far from their neighbours, each with a guess whether it was written in °F. */
export function temperatureSampleQuestions(samples: readonly TemperatureSampleInput[]): SampleQuestion[] {
  const order = samples.map((s, i) => ({ ...s, i })).filter((s) => Number.isFinite(s.airTempC)).sort((a, b) => a.at.getTime() - b.at.getTime());
  const questions: SampleQuestion[] = [];
  order.forEach((s, k) => {
    const near = order
      .slice(Math.max(0, k - NEIGHBOURS_EACH_SIDE), k + NEIGHBOURS_EACH_SIDE + 1)
      .filter((n) => n !== s && Math.abs(n.at.getTime() - s.at.getTime()) <= NEIGHBOUR_MAX_GAP_MS)
      .map((n) => n.airTempC);
    if (near.length === 0) return;
    const centre = median(near);
    const range = Math.max(...near) - Math.min(...near);
    if (Math.abs(s.airTempC - centre) <= SAMPLE_JUMP_K + range) return;
    const asCelsius = toSi(s.airTempC, "degF");
    const looksLikeFahrenheit = Math.abs(asCelsius - centre) <= FAHRENHEIT_MATCH_K + range / 2;
    const message = looksLikeFahrenheit
      ? `${s.airTempC} °C is far from its neighbours (about ${centre.toFixed(1)} °C); it looks like °F (${asCelsius.toFixed(1)} °C). Check the column's unit.`
      : `${s.airTempC} °C is far from its neighbours (about ${centre.toFixed(1)} °C); check this sample.`;
    questions.push({ field: "air_temp_c", severity: "warn", message, index: s.i, looksLikeFahrenheit, neighboursC: centre });
  });
  return questions.sort((a, b) => a.index - b.index);
}

/** Air at a site seldom averages above this; a whole series that does was probably written in °F (common practice). */
export const SERIES_FAHRENHEIT_MEDIAN_C = 40;

/** A question for a whole series whose median only makes sense in °F. */
export function temperatureSeriesQuestion(samples: readonly TemperatureSampleInput[]): Question | null {
  const values = samples.map((s) => s.airTempC).filter(Number.isFinite);
  if (values.length === 0) return null;
  const m = median(values);
  if (m <= SERIES_FAHRENHEIT_MEDIAN_C) return null;
  return { field: "air_temp_c", severity: "warn", message: `The samples' median is ${m.toFixed(1)} °C; were they written in °F (${toSi(m, "degF").toFixed(1)} °C)?` };
}

// ── Mounting ──────────────────────────────────────────────────────────────────────────────────────

export interface MountingFacts {
  /** Sensor face above the tank bottom. */
  mountHeightM: number;
  /** The tank's full internal height (from its shape or strapping table). */
  tankHeightM: number;
  /** The measuring channel's blanking distance and range, when a channel is attached. */
  minRangeM?: number | null;
  maxRangeM?: number | null;
}

/**
 * A sensor face below the tank's top would sit inside the tank: refused. A full tank inside the blanking
 * distance, or a bottom beyond the range, is allowed but said: those levels will read "too close" or
 * "no echo".
 */
export function mountingQuestions(f: MountingFacts, write: LengthWriter = metres): Question[] {
  const q: Question[] = [];
  if (f.mountHeightM < f.tankHeightM) {
    q.push({
      field: "mount_height_m",
      severity: "refuse",
      message: `A sensor face ${write(f.mountHeightM)} above the bottom sits inside a tank ${write(f.tankHeightM)} high, and levels above it could not be measured. The mounting height counts from the tank bottom to the sensor face.`,
    });
    return q;
  }
  const headroom = f.mountHeightM - f.tankHeightM;
  if (f.minRangeM != null && headroom < f.minRangeM) {
    q.push({
      field: "mount_height_m",
      severity: "warn",
      message: `A full tank comes within ${write(headroom)} of the sensor, inside its ${write(f.minRangeM)} blanking distance: the top ${write(f.minRangeM - headroom)} will read "too close".`,
    });
  }
  if (f.maxRangeM != null && f.mountHeightM > f.maxRangeM) {
    q.push({
      field: "mount_height_m",
      severity: "warn",
      message: `The tank bottom is ${write(f.mountHeightM)} from the sensor, beyond its ${write(f.maxRangeM)} range: levels below ${write(f.mountHeightM - f.maxRangeM)} will read "no echo".`,
    });
  }
  return q;
}
