import { describe, it, expect } from "vitest";
import { median } from "simple-statistics";
import { DEMO_ASSETS, DEMO_BAYS, DEMO_DEVICES, DEMO_SITES, DEMO_TANKS } from "@/db/seeds/demo-plan";
import { simDeviceFromPlan } from "@/db/seeds/demo-keys";
import { createAssetSchema } from "@/lib/validations/asset";
import { createDeviceSchema } from "@/lib/validations/device";
import { createSiteSchema } from "@/lib/validations/site";
import { localHour, airTemperatureC, timeZoneOffsetMs } from "@/workers/simulation/climate";
import { NO_ECHO_US } from "@/workers/simulation/encoding";
import type { SimDevice, SimTankChannel } from "@/workers/simulation/keys-file";
import { isDeviceOffline, readingsForCycle, trueDistanceM, type DraftReading, type ScenarioClock } from "@/workers/simulation/scenario";
import { tankFillPct } from "@/workers/simulation/tank-usage";

const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;
const uuid = (n: number) => `00000000-0000-4000-8000-${String(n).padStart(12, "0")}`;

const ASSET_IDS = Object.fromEntries(DEMO_ASSETS.map((a, i) => [a.key, uuid(1000 + i)]));
const DEVICES: SimDevice[] = DEMO_DEVICES.map((d, i) => simDeviceFromPlan(d, { deviceId: uuid(i + 1), apiKey: "test", siteId: uuid(100 + DEMO_SITES.findIndex((s) => s.key === d.site)), assetIds: ASSET_IDS }));
const device = (serial: string) => DEVICES.find((d) => d.serial === serial) as SimDevice;

// A fixed scenario: history from 1 March 2026, first run a fortnight later.
const FIRST_RUN = Date.parse("2026-03-15T12:00:00Z");
const CLOCK: ScenarioClock = { originMs: FIRST_RUN - 14 * DAY, firstRunMs: FIRST_RUN };

function cycles(d: SimDevice, fromMs: number, toMs: number, stepMs = 5 * MIN): DraftReading[][] {
  const out: DraftReading[][] = [];
  for (let t = fromMs; t < toMs; t += stepMs) out.push(readingsForCycle(d, t, CLOCK));
  return out;
}

describe("the demo plan", () => {
  it("passes the product's own validation for every site, asset and device", () => {
    for (const s of DEMO_SITES) expect(createSiteSchema.safeParse({ name: s.name, time_zone: s.time_zone, air_temp_c: s.air_temp_c, humidity_pct: s.humidity_pct }).success).toBe(true);
    for (const t of DEMO_TANKS) {
      const r = createAssetSchema.safeParse({ site_id: uuid(1), kind: "tank", name: t.name, geometry: t.geometry, mount_height_m: t.mount_height_m, safe_fill_pct: t.safe_fill_pct, reorder_pct: t.reorder_pct });
      expect(r.success, t.name).toBe(true);
    }
    for (const b of DEMO_BAYS) {
      expect(createAssetSchema.safeParse({ site_id: uuid(1), kind: "bay", name: b.name, floor_distance_m: b.floor_distance_m, occupied_below_m: b.occupied_below_m, bay_row: b.row, bay_col: b.col }).success).toBe(true);
    }
    for (const d of DEMO_DEVICES) {
      const r = createDeviceSchema.safeParse({
        site_id: uuid(1), serial: d.serial, name: d.name, profile: d.profile, clock_hz: d.clock_hz, prescaler: d.prescaler, timer_bits: d.timer_bits,
        us_per_mm: d.us_per_mm, zero_m: d.zero_m, span_m: d.span_m, channels: d.channels.map((c) => ({ index: c.index, asset_id: uuid(2), min_range_m: c.min_range_m, max_range_m: c.max_range_m })),
      });
      expect(r.success, d.serial).toBe(true);
    }
  });

  it("covers every tank geometry, 24 bays in rows and columns on six four-channel devices, and every signal profile", () => {
    expect(DEMO_TANKS.length).toBeGreaterThanOrEqual(8);
    const shapes = new Set(DEMO_TANKS.map((t) => (t.geometry.shape === "vertical_cylinder" ? `v-${t.geometry.bottom}` : t.geometry.shape === "horizontal_cylinder" ? `h-${t.geometry.heads}` : t.geometry.shape)));
    expect([...shapes].sort()).toEqual(["h-ellipsoidal", "h-flat", "h-hemispherical", "rectangular", "strapping", "v-cone", "v-ellipsoidal", "v-flat"]);
    expect(DEMO_BAYS).toHaveLength(24);
    expect(new Set(DEMO_BAYS.map((b) => `${b.row}:${b.col}`)).size).toBe(24);
    const carPark = DEMO_DEVICES.filter((d) => d.site === "carpark");
    expect(carPark).toHaveLength(6);
    expect(carPark.every((d) => d.channels.length === 4)).toBe(true);
    expect(new Set(DEMO_DEVICES.map((d) => d.profile))).toEqual(new Set(["echo", "capture", "pulse_coded", "duty_coded"]));
    expect(DEMO_DEVICES.filter((d) => d.profile === "capture").every((d) => d.clock_hz === 16_000_000 && d.prescaler === 8 && d.timer_bits === 16)).toBe(true);
    expect(DEMO_DEVICES.filter((d) => d.behaviour.burst_size > 0)).toHaveLength(1);
    expect(DEMO_DEVICES.flatMap((d) => d.channels).filter((c) => c.temperature_source)).toHaveLength(1);
    expect(DEMO_SITES.filter((s) => s.humidity_pct !== null)).toHaveLength(1);
  });

  it("keeps every true distance inside its channel's range over two days", () => {
    for (const d of DEVICES) {
      for (const c of d.channels) {
        for (let t = CLOCK.originMs; t < CLOCK.originMs + 2 * DAY; t += 20 * MIN) {
          const distance = trueDistanceM(d, c, t);
          expect(distance, `${d.serial}/${c.index}`).toBeGreaterThanOrEqual(c.min_range_m);
          expect(distance, `${d.serial}/${c.index}`).toBeLessThanOrEqual(c.max_range_m);
        }
      }
    }
  });
});

describe("channel spacing: multiplexed channels pinged at least 60 ms apart (common practice, REFERENCES.md §2)", () => {
  it("holds on every demo device except the one that pings its channels 20 ms apart", () => {
    const breakers: string[] = [];
    for (const d of DEVICES) {
      for (const cycle of cycles(d, CLOCK.originMs, CLOCK.originMs + HOUR)) {
        const gaps = cycle.slice(1).map((r, i) => Date.parse(r.at) - Date.parse(cycle[i].at));
        if (gaps.some((g) => g < 60)) {
          expect(gaps.every((g) => g === 20)).toBe(true);
          if (!breakers.includes(d.serial)) breakers.push(d.serial);
        }
      }
    }
    expect(breakers).toEqual(["BWC-CP-04"]);
  });
});

describe("the readings of one cycle", () => {
  const SIGNALS = { echo: ["echo_us", "samples_us"], capture: ["ticks"], pulse_coded: ["pulse_us"], duty_coded: ["high_us"] } as const;

  it("carry exactly one signal of the device's profile, the vitals on the first channel and air temperature where the device has a sensor", () => {
    for (const d of DEVICES) {
      for (const cycle of cycles(d, CLOCK.originMs, CLOCK.originMs + 6 * HOUR, 30 * MIN)) {
        expect(cycle.map((r) => r.channel)).toEqual(d.channels.map((c) => c.index).sort((a, b) => a - b));
        for (const [i, r] of cycle.entries()) {
          const present = ["echo_us", "samples_us", "ticks", "pulse_us", "high_us"].filter((f) => f in r);
          expect(present).toHaveLength(1);
          expect((SIGNALS[d.profile] as readonly string[]).includes(present[0])).toBe(true);
          if (d.profile === "capture") expect(Number.isInteger(r.ticks) && Number.isInteger(r.overflows)).toBe(true);
          if (d.profile === "duty_coded") expect((r.high_us as number) < (r.period_us as number)).toBe(true);
          expect("battery_v" in r && "rssi_dbm" in r).toBe(i === 0);
          expect("air_temp_c" in r).toBe(d.behaviour.sends_air_temp);
        }
      }
    }
  });

  it("sends bursts of five pings on the burst device only", () => {
    for (const d of DEVICES) {
      const [cycle] = cycles(d, CLOCK.originMs, CLOCK.originMs + MIN);
      for (const r of cycle) expect(r.samples_us?.length ?? 0).toBe(d.serial === "BWC-NW-01" ? 5 : 0);
    }
  });

  it("now and then reports no echo (a ~38 ms pulse) or a spike, but rarely", () => {
    const readings = DEVICES.filter((d) => d.profile === "echo" && d.behaviour.burst_size === 0).flatMap((d) => cycles(d, CLOCK.originMs, CLOCK.originMs + 2 * DAY).flat());
    const noEcho = readings.filter((r) => r.echo_us === NO_ECHO_US).length;
    expect(noEcho).toBeGreaterThan(0);
    expect(noEcho / readings.length).toBeLessThan(0.01);
  });
});

describe("the scenario over time", () => {
  it("swings the air temperature daily: coldest before dawn, warmest in the afternoon, local time", () => {
    const site = device("BWC-UD-01").site;
    const day = Date.parse("2026-03-10T00:00:00Z");
    const temps = Array.from({ length: 24 }, (_, h) => airTemperatureC(site, day + h * HOUR));
    const coldest = temps.indexOf(Math.min(...temps));
    const warmest = temps.indexOf(Math.max(...temps));
    expect(coldest).toBeGreaterThanOrEqual(1);
    expect(coldest).toBeLessThanOrEqual(5);
    expect(warmest).toBeGreaterThanOrEqual(13);
    expect(warmest).toBeLessThanOrEqual(17);
  });

  it("reads local time by the IANA rules: Irish and British summer time are UTC+1, winter time UTC", () => {
    // EU and UK summer time runs from the last Sunday of March to the last Sunday of October (IANA tz database).
    expect(timeZoneOffsetMs(Date.parse("2026-01-15T12:00:00Z"), "Europe/Dublin")).toBe(0);
    expect(timeZoneOffsetMs(Date.parse("2026-07-01T12:00:00Z"), "Europe/London")).toBe(HOUR);
    expect(localHour(Date.parse("2026-07-01T12:30:00Z"), "Europe/London")).toBeCloseTo(13.5, 9);
    expect(timeZoneOffsetMs(Date.parse("2026-03-29T00:59:00Z"), "Europe/London")).toBe(0);
    expect(timeZoneOffsetMs(Date.parse("2026-03-29T01:00:00Z"), "Europe/London")).toBe(HOUR);
  });

  it("draws tanks down by use and refills them now and then (a sump: fills and is pumped out), without jumps", () => {
    for (const d of DEVICES) {
      for (const c of d.channels.filter((ch): ch is SimTankChannel => ch.kind === "tank")) {
        const fills: number[] = [];
        for (let t = CLOCK.originMs; t < FIRST_RUN; t += 5 * MIN) fills.push(tankFillPct(c.usage, t, d.site.time_zone));
        const { refill_below_pct: lo, refill_to_pct: hi, refill_minutes } = c.usage;
        expect(Math.min(...fills)).toBeGreaterThanOrEqual(lo - 1e-9);
        expect(Math.max(...fills)).toBeLessThanOrEqual(hi + 1e-9);
        const steps = fills.slice(1).map((f, i) => f - fills[i]);
        expect(Math.max(...steps.map(Math.abs))).toBeLessThanOrEqual(((hi - lo) * 5) / refill_minutes + 0.5);
        // Falling most of the time (a sump: rising), refills (pump-outs) are short.
        const towardsRefill = c.usage.fills ? steps.filter((s) => s > 0) : steps.filter((s) => s < 0);
        expect(towardsRefill.length / steps.length, c.asset_name).toBeGreaterThan(0.8);
      }
    }
    const clearwater = device("BWC-NW-01").channels[0] as SimTankChannel;
    const fills: number[] = [];
    for (let t = CLOCK.originMs; t < FIRST_RUN; t += 5 * MIN) fills.push(tankFillPct(clearwater.usage, t, "Europe/London"));
    // A refill starts where the fill turns from falling to rising.
    const rising = fills.slice(1).map((f, i) => f > fills[i]);
    const refills = rising.filter((r, i) => r && i > 0 && !rising[i - 1]).length;
    // 55 % a day over a 50 % range: a refill about every 22 h.
    expect(refills).toBeGreaterThanOrEqual(13);
    expect(refills).toBeLessThanOrEqual(17);
  });

  it("fills the sludge sump and pumps it out, as sumps are: it is not drawn down by use", () => {
    const found = DEVICES.flatMap((d) => d.channels.map((c) => ({ d, c }))).find(({ c }) => c.asset_name === "Sludge Holding Sump");
    const sump = found!.c as SimTankChannel;
    expect(sump.usage.fills).toBe(true);
    const fills: number[] = [];
    for (let t = CLOCK.originMs; t < FIRST_RUN; t += 5 * MIN) fills.push(tankFillPct(sump.usage, t, found!.d.site.time_zone));
    const falling = fills.slice(1).map((f, i) => f < fills[i]);
    const pumpOuts = falling.filter((r, i) => r && i > 0 && !falling[i - 1]).length;
    // Computed: 7 % a day over the 12 … 75 % range is a pump-out every 9 days.
    const days = (FIRST_RUN - CLOCK.originMs) / (24 * HOUR);
    expect(Math.abs(pumpOuts - (days * 7) / 63)).toBeLessThanOrEqual(1);
  });

  it("parks cars in the bays by day, their roofs nearer than the occupied-below distance, and empties them at night", () => {
    const bays = DEVICES.filter((d) => d.site.name.includes("Car Park")).flatMap((d) => d.channels.map((c) => ({ d, c })));
    const occupied = (t: number) => bays.filter(({ d, c }) => c.kind === "bay" && trueDistanceM(d, c, t) < c.occupied_below_m).length;
    const noon = Date.parse("2026-03-10T12:00:00Z");
    const night = Date.parse("2026-03-11T03:00:00Z");
    expect(occupied(noon)).toBeGreaterThanOrEqual(6);
    expect(occupied(night)).toBe(0);
    for (const { d, c } of bays) {
      if (c.kind !== "bay") continue;
      const seen = new Set<number>();
      for (let t = noon - 6 * HOUR; t < noon + 8 * HOUR; t += 5 * MIN) seen.add(Math.round(trueDistanceM(d, c, t) * 1000));
      expect(seen.has(c.floor_distance_m * 1000)).toBe(true);
    }
  });

  it("drifts one channel: the empty floor reads farther by mm_per_day for each day since the onset", () => {
    const d = device("BWC-CP-05");
    const c = d.channels.find((ch) => ch.fault?.kind === "drift");
    expect(c).toBeDefined();
    const fault = c!.fault as { kind: "drift"; mm_per_day: number; starts_days_before_first_run: number };
    const onset = FIRST_RUN - fault.starts_days_before_first_run * DAY;
    // Night-time readings see the empty floor; decode with the reading's own air temperature and c = 331.3·√(1+T/273.15) (REFERENCES.md §1–2).
    const floorAt = (fromMs: number) => {
      const ds = cycles(d, fromMs, fromMs + 3 * HOUR, 5 * MIN)
        .map((cycle) => cycle.find((r) => r.channel === c!.index) as DraftReading)
        .filter((r) => r.echo_us !== NO_ECHO_US)
        .map((r) => ((331.3 * Math.sqrt(1 + (r.air_temp_c as number) / 273.15)) * (r.echo_us as number) * 1e-6) / 2);
      return median(ds);
    };
    const nightBefore = Date.parse("2026-03-08T01:00:00Z");
    const nightAfter = Date.parse("2026-03-14T01:00:00Z");
    expect(nightBefore).toBeLessThan(onset);
    const expected = (fault.mm_per_day * (nightAfter + 1.5 * HOUR - onset)) / DAY / 1000;
    expect(floorAt(nightAfter) - floorAt(nightBefore)).toBeCloseTo(expected, 2);
  });

  it("sticks one channel: after its onset it repeats exactly the same value", () => {
    const d = device("BWC-NW-02");
    const c = d.channels.find((ch) => ch.fault?.kind === "stuck")!;
    const onset = FIRST_RUN - (c.fault as { starts_days_before_first_run: number }).starts_days_before_first_run * DAY;
    const ticks = (from: number, to: number) => new Set(cycles(d, from, to).map((cycle) => cycle.find((r) => r.channel === c.index)!.ticks));
    expect(ticks(onset - DAY, onset - HOUR).size).toBeGreaterThan(20);
    expect(ticks(onset + 1, onset + 2 * DAY).size).toBe(1);
  });

  it("takes one device offline for a few hours in the backfill and again every couple of days", () => {
    const offline = DEVICES.filter((d) => d.behaviour.goes_offline);
    expect(offline.map((d) => d.serial)).toEqual(["BWC-UD-01"]);
    const dark: number[] = [];
    for (let t = CLOCK.originMs; t < CLOCK.originMs + 14 * DAY; t += 5 * MIN) if (isDeviceOffline(offline[0], t, CLOCK)) dark.push(t);
    const hours = (dark.length * 5) / 60;
    expect(hours).toBeGreaterThanOrEqual(6 * 3);
    expect(hours).toBeLessThanOrEqual(7 * 4);
    expect(DEVICES.filter((d) => d !== offline[0]).some((d) => dark.some((t) => isDeviceOffline(d, t, CLOCK)))).toBe(false);
  });
});
