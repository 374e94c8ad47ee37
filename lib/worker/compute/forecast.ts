// Forecast stage for one tank: its recent hourly volumes and its purpose → what its plan needs
// (lib/forecast/purpose.ts projectTank: readiness first, then the consumption trend with refills or
// pump-outs left out), dated from the latest measured volume. What depends on the moment of reading
// (open flags, a value gone stale, a date now passed) is left to the read models (planRow).

import { detectRefills, type VolumeSample } from "../../forecast/consumption";
import { projectTank, type TankProjection, type TankPurpose } from "../../forecast/purpose";
import { PIPELINE_SETTINGS } from "./settings";

export interface TankForecastInput {
  purpose: TankPurpose;
  /** Hourly mean volumes over the window, any order. */
  series: readonly VolumeSample[];
  capacityL: number | null;
  reorderPct: number | null;
  safeFillPct: number | null;
  /** The latest measured volume and its time; null before the first. */
  current: VolumeSample | null;
}

export interface TankForecast extends TankProjection {
  samples: number;
  /** When the refills (a sump: the pump-outs) in the window began. */
  refills: Date[];
}

export function forecastTank(input: TankForecastInput): TankForecast {
  const { series, capacityL, purpose } = input;
  const share = PIPELINE_SETTINGS.forecastRefillShare;
  // A sump's pump-out is a rise of the room left in it.
  const refills =
    capacityL !== null && capacityL > 0
      ? detectRefills(purpose === "sump" ? series.map((s) => ({ at: s.at, volumeL: capacityL - s.volumeL })) : series, { refillThresholdL: share * capacityL }).map((r) => r.at)
      : [];
  return { samples: series.length, refills, ...projectTank({ ...input, refillShare: share }) };
}
