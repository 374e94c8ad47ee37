// The worker's tuning in one place. These are the product's own choices (engineering judgement, not
// published constants) unless a comment names a source; tests read them from here instead of
// repeating the numbers. The air temperature's uncertainty by source is the uncertainty module's
// (AIR_TEMPERATURE_UNCERTAINTY_K in lib/uncertainty/air-temperature.ts).

export const PIPELINE_SETTINGS = {
  /** An echo this long means the sensor timed out: hobby-class modules report no echo as a pulse of roughly 36–38 ms (common practice). */
  noEchoTofUs: 35_000,
  /** Plausible air temperatures a reading may report (the device API's own bounds); outside them the next source is used. */
  readingTempMinC: -60,
  readingTempMaxC: 90,
  /** Fallback when a site has no temperature source at all (PRODUCT.md). */
  defaultTempC: 20,
  /** Site temperature samples: interpolate between two no further apart than this… */
  tempInterpolationMaxGapS: 6 * 3600,
  /** …or take the nearest one when it is at most this far from the reading. */
  tempNearestMaxS: 3600,
  /** A burst whose spread (MAD, as one-way distance) exceeds this is "noisy". */
  noisyBurstSpreadM: 0.01,
  /** Tolerance outside the tank before a level is "out_of_bounds": the larger of this and 3 uncertainties. */
  outOfBoundsToleranceM: 0.02,
  /** Hampel filter over the channel's recent distances: half-window k (the window holds 2k values). */
  hampelHalfWindow: 5,
  hampelSigmas: 3,
  /** Values with fewer predecessors are not judged (hampelFlags' own default: three survive one outlier). */
  hampelMinWindow: 3,
  /** Floor on the Hampel filter's robust σ, so a steady quantised channel is not all outliers. */
  hampelMinSigmaM: 0.003,
  /** Bays: hysteresis above occupied_below_m before a bay is vacant again, and agreeing readings needed. */
  bayHysteresisM: 0.1,
  bayDebounce: 2,
  /** Drift CUSUM on reference residuals: residuals used to estimate σ before charting, and σ's floor. */
  driftWarmup: 20,
  driftMinSigmaM: 0.003,
  /** Drift from manual dips: fewest dips for a verdict, σ floor (a dipstick reads to a few mm), and how near in time a measurement must be. */
  dipMinSamples: 4,
  dipMinSigmaM: 0.005,
  dipMatchWindowS: 30 * 60,
  /** Stuck: this many consecutive raw values without any change. */
  stuckSamples: 20,
  /** Noisy channel: median burst spread, or robust σ of successive distances, above these. */
  noisyChannelSpreadM: 0.01,
  noisyChannelSigmaM: 0.02,
  noisyWindow: 20,
  /** Out of range / no echo flags: this many consecutive readings with that status open the flag, as many good ones clear it. */
  statusRunLength: 5,
  /** Pings of two channels of one device closer than this risk crosstalk: 60 ms between pings is common practice. */
  crosstalkGapMs: 60,
  /** Recent apparent-speed-of-sound ratios kept for the health view. */
  apparentSpeedWindow: 15,
  /**
   * Forecast: hourly rollups over this many days; a rise above this share of capacity is a refill (a
   * sump's fall, a pump-out). How much history is enough is lib/forecast/readiness.ts's to say.
   */
  forecastWindowDays: 7,
  forecastRefillShare: 0.05,
} as const;

export type PipelineSettings = typeof PIPELINE_SETTINGS;
