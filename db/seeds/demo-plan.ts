import type { TankGeometry } from "../../lib/geometry/tank-volume";
import type { TankPurpose } from "../../lib/forecast/purpose";
import type { SignalProfile } from "../../lib/validations/device";
import type { ChannelFault, SimBehaviour, TankUsage } from "../../workers/simulation/keys-file";

// The demo scenario, all of it invented: the sites, tanks and car park of a water cooperative that does
// not exist, with sizes, mountings and habits chosen to look like a real fleet.

export type DemoSiteKey = "north" | "upland" | "carpark";

export interface DemoSite {
  key: DemoSiteKey;
  name: string;
  time_zone: string;
  /** The site's fixed fallback temperature, °C; null where a temperature channel serves instead. */
  air_temp_c: number | null;
  humidity_pct: number | null;
  /** The demo weather the simulator plays (not stored on the site). */
  climate: { mean_temp_c: number; daily_swing_c: number };
}

/** Alarm setpoints of a demo tank, % of capacity by volume. */
export interface DemoSetpointsPct {
  ll: number;
  l: number;
  h: number;
  hh: number;
}

export interface DemoTank {
  kind: "tank";
  key: string;
  site: DemoSiteKey;
  name: string;
  /** What the tank is for (lib/forecast/purpose.ts): what its plan is, if any. */
  purpose: TankPurpose;
  geometry: TankGeometry;
  mount_height_m: number;
  safe_fill_pct: number;
  reorder_pct: number;
  usage: TankUsage;
  /**
   * Outside the tank's normal operating band (refill_below … refill_to): H and HH above the top of a
   * refill, L and LL below the point where it is refilled, so a normal day raises nothing.
   */
  setpoints_pct: DemoSetpointsPct;
  /** Level-alarm activations the scenario means this tank to raise over its 30 days, and why. */
  planted_activations: { l: number; ll: number; h: number; hh: number; why: string | null };
}

export interface DemoBay {
  kind: "bay";
  key: string;
  site: DemoSiteKey;
  name: string;
  row: number;
  col: number;
  level: string;
  floor_distance_m: number;
  occupied_below_m: number;
  popularity: number;
}

export type DemoAsset = DemoTank | DemoBay;

export interface DemoChannel {
  index: number;
  asset: string;
  min_range_m: number;
  max_range_m: number;
  fault?: ChannelFault;
  temperature_source?: boolean;
}

export interface DemoDevice {
  serial: string;
  name: string;
  site: DemoSiteKey;
  profile: SignalProfile;
  clock_hz?: number;
  prescaler?: number;
  timer_bits?: number;
  us_per_mm?: number;
  zero_m?: number;
  span_m?: number;
  period_us?: number;
  firmware: string;
  behaviour: SimBehaviour;
  channels: DemoChannel[];
}

export const DEMO_SITES: DemoSite[] = [
  { key: "north", name: "North Works", time_zone: "Europe/London", air_temp_c: 11, humidity_pct: 78, climate: { mean_temp_c: 10.5, daily_swing_c: 9 } },
  { key: "upland", name: "Upland Depot", time_zone: "Europe/Dublin", air_temp_c: 9, humidity_pct: null, climate: { mean_temp_c: 8.5, daily_swing_c: 11 } },
  { key: "carpark", name: "Civic Centre Car Park", time_zone: "Europe/London", air_temp_c: null, humidity_pct: null, climate: { mean_temp_c: 14, daily_swing_c: 2.5 } },
];

const usage = (use_pct_per_day: number, refill_below_pct: number, refill_to_pct: number, refill_minutes: number, phase: number): TankUsage => ({
  use_pct_per_day,
  refill_below_pct,
  refill_to_pct,
  refill_minutes,
  phase,
});

const setpoints = (ll: number, l: number, h: number, hh: number): DemoSetpointsPct => ({ ll, l, h, hh });
const QUIET = { l: 0, ll: 0, h: 0, hh: 0, why: null };

// Every geometry the product knows: vertical cylinders with flat, cone and ellipsoidal bottoms;
// horizontal cylinders with flat, hemispherical and ellipsoidal heads; rectangular; a strapping table.
export const DEMO_TANKS: DemoTank[] = [
  {
    kind: "tank", key: "clearwater", site: "north", name: "Clearwater Tank",
    purpose: "process",
    geometry: { shape: "vertical_cylinder", diameter_m: 6, height_m: 3.5, bottom: "flat", bottom_depth_m: 0 },
    mount_height_m: 3.8, safe_fill_pct: 92, reorder_pct: 30, usage: usage(55, 38, 88, 100, 0.2),
    setpoints_pct: setpoints(15, 30, 90, 92), planted_activations: QUIET,
  },
  {
    kind: "tank", key: "hypochlorite", site: "north", name: "Hypochlorite Day Tank",
    purpose: "supply",
    geometry: { shape: "vertical_cylinder", diameter_m: 1.2, height_m: 1.6, bottom: "cone", bottom_depth_m: 0.3 },
    mount_height_m: 2.05, safe_fill_pct: 90, reorder_pct: 25,
    // The planted problem of North Works: the supplier is late, the tank stands near LL at the first run
    // and the delivery arrives five hours later.
    usage: { ...usage(6.5, 18, 85, 40, 0.55), late_delivery: { fill_at_first_run_pct: 10, arrives_hours_after_first_run: 5 } },
    setpoints_pct: setpoints(6, 12, 88, 90), planted_activations: { l: 1, ll: 0, h: 0, hh: 0, why: "delivery late: below L before the first run, refilled five hours after it" },
  },
  {
    kind: "tank", key: "coagulant", site: "north", name: "Coagulant Tank",
    purpose: "supply",
    geometry: { shape: "vertical_cylinder", diameter_m: 2.4, height_m: 2, bottom: "ellipsoidal", bottom_depth_m: 0.6 },
    mount_height_m: 2.75, safe_fill_pct: 90, reorder_pct: 30, usage: usage(4, 22, 85, 50, 0.8),
    setpoints_pct: setpoints(8, 15, 88, 90), planted_activations: QUIET,
  },
  {
    kind: "tank", key: "diesel", site: "north", name: "Standby Generator Diesel",
    purpose: "supply",
    geometry: { shape: "horizontal_cylinder", diameter_m: 1.5, length_m: 2.8, heads: "flat" },
    mount_height_m: 1.6, safe_fill_pct: 90, reorder_pct: 40, usage: usage(1.5, 35, 85, 30, 0.6),
    // A standby generator keeps a reserve: L well above empty.
    setpoints_pct: setpoints(20, 30, 88, 90), planted_activations: QUIET,
  },
  {
    kind: "tank", key: "lime", site: "north", name: "Lime Slurry Tank",
    purpose: "supply",
    geometry: { shape: "rectangular", length_m: 2, width_m: 1.5, height_m: 1.8 },
    mount_height_m: 1.95, safe_fill_pct: 88, reorder_pct: 30, usage: usage(9, 25, 82, 60, 0.3),
    setpoints_pct: setpoints(10, 18, 86, 88), planted_activations: QUIET,
  },
  {
    kind: "tank", key: "service", site: "upland", name: "Upland Service Tank",
    purpose: "process",
    geometry: { shape: "horizontal_cylinder", diameter_m: 2.8, length_m: 7.5, heads: "hemispherical" },
    mount_height_m: 2.95, safe_fill_pct: 93, reorder_pct: 35, usage: usage(30, 40, 88, 120, 0.45),
    setpoints_pct: setpoints(20, 32, 91, 93), planted_activations: QUIET,
  },
  {
    kind: "tank", key: "backwash", site: "upland", name: "Backwash Recovery Tank",
    purpose: "process",
    geometry: { shape: "horizontal_cylinder", diameter_m: 2.2, length_m: 5, heads: "ellipsoidal", head_depth_m: 0.55 },
    mount_height_m: 2.35, safe_fill_pct: 90, reorder_pct: 20, usage: usage(18, 15, 80, 90, 0.7),
    setpoints_pct: setpoints(5, 10, 85, 90), planted_activations: QUIET,
  },
  {
    kind: "tank", key: "sludge", site: "upland", name: "Sludge Holding Sump",
    purpose: "sump",
    // A cast-in sump that narrows towards the bottom, measured by a strapping table (demo values).
    geometry: {
      shape: "strapping",
      points: [
        { level_m: 0, volume_l: 0 },
        { level_m: 0.2, volume_l: 900 },
        { level_m: 0.4, volume_l: 2100 },
        { level_m: 0.8, volume_l: 4800 },
        { level_m: 1.2, volume_l: 7800 },
        { level_m: 1.6, volume_l: 11000 },
        { level_m: 2, volume_l: 14300 },
        { level_m: 2.4, volume_l: 17700 },
      ],
    },
    // It fills with settled sludge about 7 % a day and is pumped out from 75 % down to 12 % by a small
    // pump over a nine-hour shift: slowly enough that its level falls under the rate-of-change limit.
    mount_height_m: 2.6, safe_fill_pct: 85, reorder_pct: 15, usage: { ...usage(7, 12, 75, 540, 0.1), fills: true },
    setpoints_pct: setpoints(4, 8, 80, 85), planted_activations: QUIET,
  },
  {
    kind: "tank", key: "firewater", site: "upland", name: "Fire Water Tank",
    purpose: "reserve",
    geometry: { shape: "vertical_cylinder", diameter_m: 4, height_m: 3.2, bottom: "flat", bottom_depth_m: 0 },
    mount_height_m: 3.45, safe_fill_pct: 95, reorder_pct: 70, usage: usage(1.2, 80, 92, 240, 0.5),
    // The fire reserve matters most: L just under the refill point, LL where the reserve is at risk.
    setpoints_pct: setpoints(60, 75, 94, 95), planted_activations: QUIET,
  },
];

const BAY_ROWS = ["A", "B", "C", "D"];
const BAY_COLUMNS = 6;
const CAR_PARK_LEVEL = "Level −1";

// Four rows of six bays under a 2.55 m soffit; a car's roof comes nearer than 1.9 m.
export const DEMO_BAYS: DemoBay[] = BAY_ROWS.flatMap((row, r) =>
  Array.from({ length: BAY_COLUMNS }, (_, c): DemoBay => ({
    kind: "bay",
    key: `bay-${row}${c + 1}`,
    site: "carpark",
    name: `Bay ${row}${c + 1}`,
    row: r,
    col: c,
    level: CAR_PARK_LEVEL,
    floor_distance_m: 2.55,
    occupied_below_m: 1.9,
    // Bays near the lifts (column 1) and on the drive-in row fill first.
    popularity: Math.max(0.15, 1 - c * 0.14 - (r === 0 ? 0 : 0.1 * r)),
  })),
);

export const DEMO_ASSETS: DemoAsset[] = [...DEMO_TANKS, ...DEMO_BAYS];

const tankChannel = (index: number, asset: string, extra: Partial<DemoChannel> = {}): DemoChannel => {
  const tank = DEMO_TANKS.find((t) => t.key === asset);
  if (!tank) throw new Error(`demo plan: no tank ${asset}`);
  return { index, asset, min_range_m: 0.2, max_range_m: Math.round((tank.mount_height_m + 0.3) * 100) / 100, ...extra };
};

const SOLAR = { solar: true, battery_v: 3.82 };
const MAINS = { solar: false, battery_v: 4.08 };
const NORMAL = { channel_spacing_ms: 80, burst_size: 0, sends_air_temp: false, goes_offline: false };

/** A car-park unit on one column of bays, pinging its four transducers rows A to D. */
interface CarParkOptions extends Partial<Omit<DemoDevice, "behaviour" | "channels">> {
  behaviour?: Partial<SimBehaviour>;
  faults?: Record<number, ChannelFault>;
  temperatureSource?: number;
}

function carParkDevice(n: number, extra: CarParkOptions): DemoDevice {
  const { behaviour, faults, temperatureSource, ...rest } = extra;
  return {
    serial: `BWC-CP-${String(n).padStart(2, "0")}`,
    name: `Car park column ${n}`,
    site: "carpark",
    profile: "echo",
    firmware: "2.4.1",
    behaviour: { ...NORMAL, ...MAINS, rssi_dbm: -62 - n * 3, ...behaviour },
    channels: BAY_ROWS.map((row, index) => ({
      index,
      asset: `bay-${row}${n}`,
      min_range_m: 0.25,
      max_range_m: 4,
      ...(faults?.[index] ? { fault: faults[index] } : {}),
      ...(temperatureSource === index ? { temperature_source: true } : {}),
    })),
    ...rest,
  };
}

export const DEMO_DEVICES: DemoDevice[] = [
  {
    serial: "BWC-NW-01", name: "North Works gauge A", site: "north", profile: "echo", firmware: "3.1.0",
    behaviour: { ...NORMAL, ...SOLAR, burst_size: 5, sends_air_temp: true, rssi_dbm: -79 },
    channels: [tankChannel(0, "clearwater"), tankChannel(1, "hypochlorite"), tankChannel(2, "coagulant")],
  },
  {
    serial: "BWC-NW-02", name: "North Works gauge B", site: "north", profile: "capture", clock_hz: 16_000_000, prescaler: 8, timer_bits: 16, firmware: "1.8.2",
    behaviour: { ...NORMAL, ...SOLAR, channel_spacing_ms: 70, rssi_dbm: -84 },
    channels: [tankChannel(0, "diesel"), tankChannel(1, "lime", { fault: { kind: "stuck", starts_days_before_first_run: 2 } })],
  },
  {
    serial: "BWC-UD-01", name: "Upland pulse gauge", site: "upland", profile: "pulse_coded", us_per_mm: 5.8, firmware: "5.0.3",
    behaviour: { ...NORMAL, ...SOLAR, channel_spacing_ms: 100, goes_offline: true, rssi_dbm: -97 },
    channels: [tankChannel(0, "service"), tankChannel(1, "backwash")],
  },
  {
    serial: "BWC-UD-02", name: "Upland duty gauge", site: "upland", profile: "duty_coded", zero_m: 0.25, span_m: 4.75, period_us: 1000, firmware: "2.2.0",
    behaviour: { ...NORMAL, ...SOLAR, rssi_dbm: -91 },
    channels: [tankChannel(0, "sludge"), tankChannel(1, "firewater")],
  },
  carParkDevice(1, { behaviour: { sends_air_temp: true }, temperatureSource: 0 }),
  carParkDevice(2, {}),
  carParkDevice(3, { profile: "capture", clock_hz: 16_000_000, prescaler: 8, timer_bits: 16, firmware: "1.8.2" }),
  // Pings its channels 20 ms apart, against the 60 ms rule of thumb: the crosstalk-risk example.
  carParkDevice(4, { behaviour: { channel_spacing_ms: 20 } }),
  carParkDevice(5, { behaviour: { sends_air_temp: true }, faults: { 2: { kind: "drift", mm_per_day: 8, starts_days_before_first_run: 6 } } }),
  carParkDevice(6, {}),
];

/** Every demo device measures on the backfill's 5-minute grid; live it reports more often than that. */
export const DEMO_EXPECTED_INTERVAL_S = 300;
