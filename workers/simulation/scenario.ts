import { speedOfSoundFor } from "../../lib/physics/speed-of-sound";
import { carInBay } from "./bay-traffic";
import { airTemperatureC, daylight, localHour } from "./climate";
import { echoMicroseconds, encodeCapture, encodeDuty, encodePulse, NO_ECHO_US, roundEchoUs } from "./encoding";
import type { SimChannel, SimDevice } from "./keys-file";
import { gaussianAt, seedFromText, uniformAt } from "./random";
import { levelForFillPct, scenarioFillPct } from "./tank-usage";

const MINUTE_MS = 60_000;
const HOUR_MS = 60 * MINUTE_MS;
const DAY_MS = 24 * HOUR_MS;

/** When the scenario began: the oldest backfilled time and the simulator's first run; faults are placed relative to them. */
export interface ScenarioClock {
  originMs: number;
  firstRunMs: number;
}

/** A reading as the device API takes it, before the device numbers it. */
export interface DraftReading {
  at: string;
  channel: number;
  echo_us?: number;
  ticks?: number;
  overflows?: number;
  samples_us?: number[];
  pulse_us?: number;
  high_us?: number;
  period_us?: number;
  air_temp_c?: number;
  battery_v?: number;
  rssi_dbm?: number;
}

export interface OutgoingReading extends DraftReading {
  seq: number;
}

// How often the field does something odd, per ping (demo choices).
const NO_ECHO_CHANCE = 0.002;
const SPIKE_CHANCE = 0.003;
const CROSSTALK_CHANCE = 0.04;
const STRAY_SAMPLE_CHANCE = 0.15;
const DISTANCE_NOISE_M = 0.0015;
const BURST_JITTER_US = 3;
// Multiplexed channels closer than this hear each other's echoes (common practice).
const SAFE_CHANNEL_SPACING_MS = 60;

// A flaky link: dark for OFFLINE_HOURS every OFFLINE_EVERY_HOURS, the first time OFFLINE_FIRST_HOURS after the origin.
const OFFLINE_FIRST_HOURS = 20;
const OFFLINE_EVERY_HOURS = 53;
const OFFLINE_HOURS = 3.5;

/** Whether a device that goes offline now and then is dark at tMs. */
export function isDeviceOffline(device: SimDevice, tMs: number, clock: ScenarioClock): boolean {
  if (!device.behaviour.goes_offline) return false;
  const since = tMs - clock.originMs - OFFLINE_FIRST_HOURS * HOUR_MS;
  if (since < 0) return false;
  return since % (OFFLINE_EVERY_HOURS * HOUR_MS) < OFFLINE_HOURS * HOUR_MS;
}

/**
 * The physical distance from the sensor face to what it sees: the liquid surface, a car roof or the
 * floor. Without a clock, planted problems placed relative to the first run (a late delivery) are left out.
 */
export function trueDistanceM(device: SimDevice, channel: SimChannel, tMs: number, clock?: ScenarioClock): number {
  if (channel.kind === "tank") {
    const fill = scenarioFillPct(channel.usage, tMs, device.site.time_zone, clock?.firstRunMs ?? null);
    return channel.mount_height_m - levelForFillPct(channel.geometry, fill);
  }
  const car = carInBay(channel.asset_id, channel.popularity, tMs, device.site.time_zone);
  return car ? channel.floor_distance_m - car.roofHeightM : channel.floor_distance_m;
}

function faultOnsetMs(channel: SimChannel, clock: ScenarioClock): number | null {
  if (!channel.fault) return null;
  return Math.max(clock.originMs, clock.firstRunMs - channel.fault.starts_days_before_first_run * DAY_MS);
}

type SignalFields = Pick<DraftReading, "echo_us" | "ticks" | "overflows" | "samples_us" | "pulse_us" | "high_us" | "period_us">;

interface Ping {
  distanceM: number;
  tempC: number;
  noEcho: boolean;
  /** Adds the burst's jitter and strays (off for a frozen value). */
  jitterSeed: number | null;
  tMs: number;
}

function burstSamples(echoUs: number, size: number, ping: Ping): number[] {
  return Array.from({ length: size }, (_, i) => {
    if (ping.noEcho) return NO_ECHO_US;
    if (ping.jitterSeed === null) return roundEchoUs(echoUs);
    const stray = i === size - 1 && uniformAt(ping.jitterSeed, ping.tMs, 11) < STRAY_SAMPLE_CHANCE ? 1.1 : 1;
    return roundEchoUs(echoUs * stray + BURST_JITTER_US * gaussianAt(ping.jitterSeed, ping.tMs, 12, i));
  });
}

/** The signal fields of the device's profile for one ping. */
function encodeSignal(device: SimDevice, ping: Ping): SignalFields {
  const t = device.timing;
  if (device.profile === "pulse_coded") return encodePulse(ping.distanceM, t.us_per_mm ?? 5.8);
  if (device.profile === "duty_coded") return encodeDuty(ping.distanceM, { zeroM: t.zero_m ?? 0, spanM: t.span_m ?? 5, periodUs: t.period_us ?? 1000 });
  const speed = speedOfSoundFor({ tempC: ping.tempC, humidityPct: device.site.humidity_pct }).speedMs;
  const echoUs = ping.noEcho ? NO_ECHO_US : echoMicroseconds(ping.distanceM, speed);
  if (device.profile === "capture") {
    return encodeCapture(echoUs, { clockHz: t.clock_hz ?? 16_000_000, prescaler: t.prescaler ?? 8, timerBits: t.timer_bits ?? 16 });
  }
  if (device.behaviour.burst_size > 0) return { samples_us: burstSamples(echoUs, device.behaviour.burst_size, ping) };
  return { echo_us: roundEchoUs(echoUs) };
}

/** The value a stuck channel repeats: its clean reading at the moment it stuck. */
function frozenSignal(device: SimDevice, channel: SimChannel, onsetMs: number, clock: ScenarioClock): SignalFields {
  return encodeSignal(device, { distanceM: trueDistanceM(device, channel, onsetMs, clock), tempC: airTemperatureC(device.site, onsetMs), noEcho: false, jitterSeed: null, tMs: onsetMs });
}

function measuredDistanceM(device: SimDevice, channel: SimChannel, position: number, tMs: number, clock: ScenarioClock): { distanceM: number; noEcho: boolean } {
  const seed = seedFromText(`${device.id}:${channel.index}`);
  let distance = trueDistanceM(device, channel, tMs, clock);
  const onset = faultOnsetMs(channel, clock);
  if (channel.fault?.kind === "drift" && onset !== null && tMs > onset) {
    distance += ((channel.fault.mm_per_day / 1000) * (tMs - onset)) / DAY_MS;
  }
  distance += DISTANCE_NOISE_M * gaussianAt(seed, tMs, 1);
  const event = uniformAt(seed, tMs, 2);
  const echoTimed = device.profile === "echo" || device.profile === "capture";
  if (echoTimed && event < NO_ECHO_CHANCE) return { distanceM: distance, noEcho: true };
  if (event < NO_ECHO_CHANCE + SPIKE_CHANCE) {
    // A stray reflection (a ladder rung, a ripple, a passer-by) nearer than the real target.
    return { distanceM: Math.max(channel.min_range_m, distance * (0.35 + 0.35 * uniformAt(seed, tMs, 3))), noEcho: false };
  }
  // Pinged too soon after its neighbour, a channel now and then hears the neighbour's echo instead.
  if (position > 0 && device.behaviour.channel_spacing_ms < SAFE_CHANNEL_SPACING_MS && uniformAt(seed, tMs, 4) < CROSSTALK_CHANCE) {
    const neighbour = [...device.channels].sort((a, b) => a.index - b.index)[position - 1];
    return { distanceM: trueDistanceM(device, neighbour, tMs, clock), noEcho: false };
  }
  return { distanceM: Math.max(0, distance), noEcho: false };
}

function deviceVitals(device: SimDevice, tMs: number, clock: ScenarioClock): Pick<DraftReading, "battery_v" | "rssi_dbm"> {
  const seed = seedFromText(device.id);
  const b = device.behaviour;
  const charge = b.solar ? 0.12 * daylight(localHour(tMs, device.site.time_zone)) : 0;
  const ageing = (0.002 * Math.max(0, tMs - clock.originMs)) / DAY_MS;
  return {
    battery_v: Math.round((b.battery_v + charge - ageing + 0.01 * gaussianAt(seed, tMs, 21)) * 100) / 100,
    rssi_dbm: Math.round(b.rssi_dbm + 3 * gaussianAt(seed, tMs, 22)),
  };
}

/** Ping time of the channel at `position` (0, 1, …) within a cycle, ms. */
export function pingTimeMs(device: SimDevice, cycleMs: number, position: number): number {
  return cycleMs + position * device.behaviour.channel_spacing_ms;
}

/**
 * One measuring cycle of a device: its channels pinged in index order, channel_spacing_ms apart, each
 * with the distance the scenario puts in front of it, encoded in the device's profile.
 */
export function readingsForCycle(device: SimDevice, cycleMs: number, clock: ScenarioClock): DraftReading[] {
  const channels = [...device.channels].sort((a, b) => a.index - b.index);
  return channels.map((channel, position) => {
    const tMs = pingTimeMs(device, cycleMs, position);
    const tempC = airTemperatureC(device.site, tMs);
    const onset = faultOnsetMs(channel, clock);
    let signal: SignalFields;
    if (channel.fault?.kind === "stuck" && onset !== null && tMs >= onset) {
      signal = frozenSignal(device, channel, onset, clock);
    } else {
      const { distanceM, noEcho } = measuredDistanceM(device, channel, position, tMs, clock);
      signal = encodeSignal(device, { distanceM, tempC, noEcho, jitterSeed: seedFromText(`${device.id}:${channel.index}:burst`), tMs });
    }
    const reading: DraftReading = { at: new Date(tMs).toISOString(), channel: channel.index, ...signal };
    if (device.behaviour.sends_air_temp) reading.air_temp_c = Math.round((tempC + 0.2 * gaussianAt(seedFromText(device.id), tMs, 23)) * 10) / 10;
    if (position === 0) Object.assign(reading, deviceVitals(device, tMs, clock));
    return reading;
  });
}
