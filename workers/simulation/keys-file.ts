import path from "node:path";
import type { TankGeometry } from "../../lib/geometry/tank-volume";
import type { SignalProfile } from "../../lib/validations/device";

// The file the demo seed writes and the simulator reads: every demo device with its plain key and what the
// simulator needs to play its part. It holds secrets, so it lives in .data/ (ignored by git).

export interface SimSite {
  id: string;
  name: string;
  time_zone: string;
  /** Mean air temperature the daily cycle swings around, °C (demo climate, not the site's fixed fallback). */
  mean_temp_c: number;
  /** Difference between the warmest and the coldest hour of a day, K. */
  daily_swing_c: number;
  humidity_pct: number | null;
}

/** How a tank is drawn down and refilled: percentages of capacity (volume). */
export interface TankUsage {
  use_pct_per_day: number;
  refill_below_pct: number;
  refill_to_pct: number;
  /** How long a refill takes, minutes. */
  refill_minutes: number;
  /** Where in its draw-down the tank starts, 0 (just refilled) … 1 (about to be refilled). */
  phase: number;
  /**
   * A sump: it fills at use_pct_per_day from refill_below to refill_to and is pumped out back down
   * over refill_minutes (it is not emptied by use).
   */
  fills?: boolean;
  /**
   * A planted problem: the deliveries fell behind, so at the simulator's first run the tank stands at
   * this fill (below its refill point), still drawn down by use until the delivery arrives.
   */
  late_delivery?: { fill_at_first_run_pct: number; arrives_hours_after_first_run: number };
}

export type ChannelFault =
  | { kind: "drift"; mm_per_day: number; starts_days_before_first_run: number }
  | { kind: "stuck"; starts_days_before_first_run: number };

interface SimChannelBase {
  index: number;
  asset_id: string;
  asset_name: string;
  min_range_m: number;
  max_range_m: number;
  fault: ChannelFault | null;
  /** This channel's readings are the site's temperature source. */
  temperature_source: boolean;
}

export interface SimTankChannel extends SimChannelBase {
  kind: "tank";
  mount_height_m: number;
  geometry: TankGeometry;
  usage: TankUsage;
}

export interface SimBayChannel extends SimChannelBase {
  kind: "bay";
  floor_distance_m: number;
  occupied_below_m: number;
  /** 0 … 1: how sought-after the bay is (near the lifts, wide). */
  popularity: number;
}

export type SimChannel = SimTankChannel | SimBayChannel;

export interface SimBehaviour {
  /** Time between the pings of consecutive channels of one cycle, ms. */
  channel_spacing_ms: number;
  /** Pings a reading (samples_us); 0 sends one echo. */
  burst_size: number;
  sends_air_temp: boolean;
  /** Goes offline for a few hours now and then (flaky link). */
  goes_offline: boolean;
  battery_v: number;
  /** Solar-charged: the battery rises by day. */
  solar: boolean;
  rssi_dbm: number;
}

export interface SimTiming {
  clock_hz: number | null;
  prescaler: number | null;
  timer_bits: number | null;
  us_per_mm: number | null;
  zero_m: number | null;
  span_m: number | null;
  /** PWM period a duty-coded device uses, µs. */
  period_us: number | null;
}

export interface SimDevice {
  serial: string;
  id: string;
  api_key: string;
  name: string;
  profile: SignalProfile;
  expected_interval_s: number;
  site: SimSite;
  timing: SimTiming;
  behaviour: SimBehaviour;
  channels: SimChannel[];
}

export interface DemoKeysFile {
  written_at: string;
  devices: SimDevice[];
}

type Env = Record<string, string | undefined>;

/** The database the environment points at; `halftrip` when unset, as lib/db/sequelize.ts assumes. */
export function databaseName(env: Env): string {
  if (!env.DATABASE_URL) return "halftrip";
  try {
    return decodeURIComponent(new URL(env.DATABASE_URL).pathname.replace(/^\//, "")) || "halftrip";
  } catch {
    return "halftrip";
  }
}

// The product's own database uses the plain names; a developer sandbox gets files of its own so that
// sandboxes seeded side by side do not overwrite each other's keys.
function dataFile(env: Env, root: string, base: string): string {
  const db = databaseName(env);
  const suffix = db === "halftrip" ? "" : `-${db.replace(/[^A-Za-z0-9_-]/g, "_")}`;
  return path.join(root, ".data", `${base}${suffix}.json`);
}

/** Where the demo keys are: DEMO_KEYS_FILE, else .data/demo-device-keys.json (per database for sandboxes). */
export function demoKeysFilePath(env: Env, root: string): string {
  return env.DEMO_KEYS_FILE ? path.resolve(root, env.DEMO_KEYS_FILE) : dataFile(env, root, "demo-device-keys");
}

/** Where the simulator keeps its seqs and backlog: SIM_STATE_FILE, else .data/simulator-state.json. */
export function simulatorStateFilePath(env: Env, root: string): string {
  return env.SIM_STATE_FILE ? path.resolve(root, env.SIM_STATE_FILE) : dataFile(env, root, "simulator-state");
}

/** The keys file's devices, or null when the text is not a keys file. */
export function parseKeysFile(text: string): DemoKeysFile | null {
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch {
    return null;
  }
  if (!data || typeof data !== "object" || !Array.isArray((data as DemoKeysFile).devices)) return null;
  const file = data as DemoKeysFile;
  const wellFormed = file.devices.every(
    (d) => typeof d?.id === "string" && typeof d.api_key === "string" && typeof d.serial === "string" && Array.isArray(d.channels) && d.site && d.behaviour && d.timing,
  );
  return wellFormed ? file : null;
}
