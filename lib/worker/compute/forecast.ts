// Forecast stage for one tank: its recent hourly volumes → consumption trend (Theil–Sen, refills
// left out, via lib/forecast/consumption) → when it reaches the reorder level and empty.

import { forecastConsumption, type VolumeSample } from "../../forecast/consumption";
import { PIPELINE_SETTINGS } from "./settings";

export interface TankForecastInput {
  /** Hourly mean volumes over the window, any order. */
  series: readonly VolumeSample[];
  capacityL: number;
  /** Reorder level as % of capacity; null when the tank has none. */
  reorderPct: number | null;
  /** The latest measured volume and its time; default: the series' last point. */
  current?: VolumeSample;
}

export interface TankForecast {
  samples: number;
  currentVolumeL: number | null;
  reorderVolumeL: number | null;
  slopeLPerDay: number | null;
  daysToReorder: number | null;
  daysToEmpty: number | null;
  reorderAt: Date | null;
  emptyAt: Date | null;
  refills: Date[];
}

export function forecastTank({ series, capacityL, reorderPct, current }: TankForecastInput): TankForecast {
  const reorderVolumeL = reorderPct === null ? null : (reorderPct / 100) * capacityL;
  const none: TankForecast = {
    samples: series.length,
    currentVolumeL: current?.volumeL ?? null,
    reorderVolumeL,
    slopeLPerDay: null,
    daysToReorder: null,
    daysToEmpty: null,
    reorderAt: null,
    emptyAt: null,
    refills: [],
  };
  if (series.length < PIPELINE_SETTINGS.forecastMinSamples || !(capacityL > 0)) return none;
  const f = forecastConsumption(series, {
    refillThresholdL: PIPELINE_SETTINGS.forecastRefillShare * capacityL,
    reorderVolumeL: reorderVolumeL ?? 0,
    currentVolumeL: current?.volumeL,
    now: current?.at,
  });
  const latest = [...series].sort((a, b) => b.at.getTime() - a.at.getTime())[0];
  return {
    samples: series.length,
    currentVolumeL: current?.volumeL ?? latest.volumeL,
    reorderVolumeL,
    slopeLPerDay: f.slopeLPerDay,
    daysToReorder: reorderVolumeL === null ? null : f.daysToReorder,
    daysToEmpty: f.daysToEmpty,
    reorderAt: reorderVolumeL === null ? null : f.reorderAt,
    emptyAt: f.emptyAt,
    refills: f.refills,
  };
}
