import { describe, it, expect } from "vitest";
import { deriveChannel } from "@/lib/worker/compute/derive";
import { blankMeasurement } from "@/lib/worker/compute/convert";
import { initialChannelState } from "@/lib/worker/compute/channel-state";
import { trackBayOccupancy } from "@/lib/occupancy/bay";
import { PIPELINE_SETTINGS } from "@/lib/worker/compute/settings";
import type { TankGeometry } from "@/lib/geometry/tank-volume";
import type { Measurement } from "@/lib/worker/compute/types";
import { bay, channel, L_PER_US_GAL, M_PER_IN, point, reading, T0, tank } from "./pipeline-fixtures";

/** A record as the convert stage leaves it: status ok with a distance. */
function measured(distanceM: number, minute = 0, c = channel()): Measurement {
  const m = blankMeasurement(reading({ at: new Date(T0 + minute * 60_000) }), c);
  m.distanceM = distanceM;
  m.rawDistanceM = distanceM;
  m.uncertaintyM = 0.001;
  return m;
}

const gallons = (litres: number | null) => (litres as number) / L_PER_US_GAL;

describe("derive: tank level and volume (REFERENCES.md §3)", () => {
  // Level = mount height − distance; the volume then comes from the tank's shape.
  function volumeAt(geometry: TankGeometry, mountM: number, levelM: number) {
    const c = channel({ asset: tank(geometry, mountM) });
    const { measurements } = deriveChannel([measured(mountM - levelM, 0, c)], c, initialChannelState());
    return measurements[0];
  }

  it("horizontal cylinder, flat ends, 6 ft × 20 ft: 1 000 gal at 20.611 in, half full 2 115 gal (Machinery's Handbook, 31st ed.)", () => {
    const g: TankGeometry = { shape: "horizontal_cylinder", diameter_m: 72 * M_PER_IN, length_m: 240 * M_PER_IN, heads: "flat" };
    const mount = 72 * M_PER_IN;
    expect(Math.abs(gallons(volumeAt(g, mount, 20.611 * M_PER_IN).volumeL) - 1000)).toBeLessThan(0.1);
    const half = volumeAt(g, mount, 36 * M_PER_IN);
    // REFERENCES.md §3: exact full 4 230.13 gal [computed], so half 2 115.07.
    expect(Math.abs(gallons(half.volumeL) - 4230.13 / 2)).toBeLessThan(0.01);
    expect(Math.abs((half.fillPct as number) - 50)).toBeLessThan(1e-9);
    expect(Math.abs(gallons(half.ullageL) - 4230.13 / 2)).toBeLessThan(0.01);
  });

  it("dished heads and bottoms: the Jones (2002) examples as reproduced by the fluids library", () => {
    const horizontal = (heads: "ellipsoidal" | "hemispherical", a?: number): TankGeometry => ({
      shape: "horizontal_cylinder",
      diameter_m: 108 * M_PER_IN,
      length_m: 156 * M_PER_IN,
      heads,
      head_depth_m: a === undefined ? undefined : a * M_PER_IN,
    });
    expect(Math.abs(gallons(volumeAt(horizontal("ellipsoidal", 42), 108 * M_PER_IN, 36 * M_PER_IN).volumeL) - 2380.957)).toBeLessThan(0.005);
    // Hemispherical heads, a = R [computed in REFERENCES.md §3].
    expect(Math.abs(gallons(volumeAt(horizontal("hemispherical"), 108 * M_PER_IN, 36 * M_PER_IN).volumeL) - 2545.462)).toBeLessThan(0.005);
    const vertical = (bottom: "cone" | "ellipsoidal"): TankGeometry => ({ shape: "vertical_cylinder", diameter_m: 132 * M_PER_IN, height_m: 100 * M_PER_IN, bottom, bottom_depth_m: 33 * M_PER_IN });
    expect(Math.abs(gallons(volumeAt(vertical("cone"), 3, 24 * M_PER_IN).volumeL) - 250.675)).toBeLessThan(0.005);
    expect(Math.abs(gallons(volumeAt(vertical("ellipsoidal"), 3, 24 * M_PER_IN).volumeL) - 783.358)).toBeLessThan(0.005);
  });

  it("interpolates a strapping table linearly", () => {
    const g: TankGeometry = { shape: "strapping", points: [{ level_m: 0, volume_l: 0 }, { level_m: 1, volume_l: 800 }, { level_m: 2, volume_l: 2000 }] };
    const m = volumeAt(g, 2.5, 1.5);
    expect(m.volumeL).toBeCloseTo(1400, 9);
    expect(m.fillPct).toBeCloseTo(70, 9);
  });

  it("marks a level outside the tank out_of_bounds and a tank without geometry invalid_config", () => {
    const g: TankGeometry = { shape: "rectangular", length_m: 2, width_m: 1.5, height_m: 2.8 };
    const c = channel({ asset: tank(g, 3) });
    const { measurements } = deriveChannel([measured(3.2, 0, c), measured(0.1, 1, c), measured(1, 2, c)], c, initialChannelState());
    expect(measurements.map((m) => m.status)).toEqual(["out_of_bounds", "out_of_bounds", "ok"]);
    expect(measurements[0].levelM).toBeCloseTo(-0.2, 12);
    expect(measurements[0].volumeL).toBeNull();
    const bare = channel({ asset: tank(g, 3, { geometry: null }) });
    expect(deriveChannel([measured(1, 0, bare)], bare, initialChannelState()).measurements[0].status).toBe("invalid_config");
  });

  it("prefers the asset's stored capacity for fill %", () => {
    const g: TankGeometry = { shape: "rectangular", length_m: 1, width_m: 1, height_m: 2 };
    const c = channel({ asset: tank(g, 2, { capacityL: 1000 }) });
    const [m] = deriveChannel([measured(1.5, 0, c)], c, initialChannelState()).measurements;
    expect(m.volumeL).toBeCloseTo(500, 9);
    expect(m.fillPct).toBeCloseTo(50, 9);
  });
});

describe("derive: spikes (Hampel filter)", () => {
  it("marks a spike in a draining tank suspect and keeps its values, but not the draw-down itself", () => {
    const g: TankGeometry = { shape: "rectangular", length_m: 2, width_m: 1.5, height_m: 2.8 };
    const c = channel({ asset: tank(g, 3) });
    // 1 mm a reading, faster than the filter's floor would allow without detrending; a 30 cm spike at 15.
    const series = Array.from({ length: 30 }, (_, k) => measured(1 + 0.004 * k + (k === 15 ? 0.3 : 0), k, c));
    const { measurements, state } = deriveChannel(series, c, initialChannelState());
    expect(measurements.filter((m) => m.status === "suspect").map((m) => m.reading.at.getTime())).toEqual([T0 + 15 * 60_000]);
    expect(measurements[15].levelM).not.toBeNull();
    expect(measurements[15].volumeL).not.toBeNull();
    expect(state.hampel).toHaveLength(2 * PIPELINE_SETTINGS.hampelHalfWindow);
  });

  it("resumes the window from the saved state", () => {
    const c = channel({ asset: point() });
    const first = deriveChannel(Array.from({ length: 12 }, (_, k) => measured(1.5, k, c)), c, initialChannelState());
    const [spike] = deriveChannel([measured(1.8, 12, c)], c, first.state).measurements;
    expect(spike.status).toBe("suspect");
    // From a fresh state there is no window yet, so nothing to judge against.
    expect(deriveChannel([measured(1.8, 12, c)], c, initialChannelState()).measurements[0].status).toBe("ok");
  });
});

describe("derive: bays", () => {
  it("tracks occupancy as lib/occupancy/bay does, with the product's hysteresis and debounce, and never calls a car a spike", () => {
    const c = channel({ asset: bay(2.5, 1.8) });
    const distances = [2.5, 2.5, 1.2, 1.2, 1.2, 1.85, 1.2, 2.5, 2.5, 2.5];
    const { measurements, sessions } = deriveChannel(distances.map((d, k) => measured(d, k, c)), c, initialChannelState());
    // Reading by reading: occupied from the second reading under 1.8 m, through 1.85 m (inside the
    // hysteresis band), vacant from the second reading back above 1.9 m.
    expect(measurements.map((m) => m.occupied)).toEqual([false, false, false, true, true, true, true, true, false, false]);
    expect(measurements.every((m) => m.status === "ok")).toBe(true);
    expect(sessions).toEqual([{ start: new Date(T0 + 2 * 60_000), end: new Date(T0 + 7 * 60_000), durationS: 300 }]);
    // Reading by reading, the same sessions as the whole series given to the library at once.
    const whole = trackBayOccupancy(
      distances.map((d, k) => ({ at: T0 + k * 60_000, distanceM: d })),
      { occupiedBelowM: 1.8, hysteresisM: PIPELINE_SETTINGS.bayHysteresisM, debounce: PIPELINE_SETTINGS.bayDebounce },
    );
    expect(sessions).toEqual(whole.sessions);
  });
});
