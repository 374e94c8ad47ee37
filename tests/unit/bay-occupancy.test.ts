import { describe, it, expect } from "vitest";
import { trackBayOccupancy, initialBayState, type BayConfig, type BayReading } from "@/lib/occupancy/bay";

// PRODUCT.md: occupied when the distance falls below occupied_below_m, with hysteresis and a
// debounce of N readings (both common practice for noisy presence sensing). Sessions below are
// worked out by hand from that rule.
const CONFIG: BayConfig = { occupiedBelowM: 1.5, hysteresisM: 0.1, debounce: 3 };
const T0 = Date.UTC(2026, 2, 14, 8, 0);
const FLOOR = 2.5;
const ROOF = 1.2;

// One reading a minute, distances in order.
function readings(distances: (number | null)[], startMinute = 0): BayReading[] {
  return distances.map((d, i) => ({ at: new Date(T0 + (startMinute + i) * 60_000), distanceM: d }));
}
const minute = (m: number) => new Date(T0 + m * 60_000);

describe("bay occupancy", () => {
  it("needs N consecutive readings to start a session and dates it by the first", () => {
    const twoOnly = trackBayOccupancy(readings([FLOOR, ROOF, ROOF, FLOOR, FLOOR]), CONFIG);
    expect(twoOnly.sessions).toEqual([]);
    expect(twoOnly.state.occupied).toBe(false);

    const three = trackBayOccupancy(readings([FLOOR, ROOF, ROOF, ROOF, ROOF]), CONFIG);
    expect(three.state.occupied).toBe(true);
    expect(three.sessions).toEqual([{ start: minute(1), end: null, durationS: 180 }]);
  });

  it("keeps the session through the hysteresis band and ends it after N readings above it", () => {
    // Occupied below 1.5 m; vacant only above 1.6 m. 1.55 m sits in the band.
    const r = readings([ROOF, ROOF, ROOF, 1.55, 1.55, 1.55, 1.55, ROOF, 1.65, 1.65, 1.65, FLOOR]);
    const { sessions, state } = trackBayOccupancy(r, CONFIG);
    expect(sessions).toEqual([{ start: minute(0), end: minute(8), durationS: 480 }]);
    expect(state.occupied).toBe(false);
  });

  it("does not enter on readings in the band either", () => {
    const { sessions } = trackBayOccupancy(readings([FLOOR, 1.55, 1.55, 1.55, 1.55]), CONFIG);
    expect(sessions).toEqual([]);
  });

  it("restarts the count when a reading disagrees, and skips readings without an echo", () => {
    // ROOF ROOF FLOOR ROOF ROOF → no session; ROOF null ROOF ROOF → a session from the first ROOF.
    expect(trackBayOccupancy(readings([ROOF, ROOF, FLOOR, ROOF, ROOF]), CONFIG).sessions).toEqual([]);
    expect(trackBayOccupancy(readings([FLOOR, ROOF, null, ROOF, ROOF]), CONFIG).sessions).toEqual([
      { start: minute(1), end: null, durationS: 180 },
    ]);
  });

  it("switches at once with debounce 1 and no hysteresis", () => {
    const { sessions } = trackBayOccupancy(readings([FLOOR, ROOF, 1.51, ROOF, FLOOR]), {
      occupiedBelowM: 1.5,
      hysteresisM: 0,
      debounce: 1,
    });
    expect(sessions).toEqual([
      { start: minute(1), end: minute(2), durationS: 60 },
      { start: minute(3), end: minute(4), durationS: 60 },
    ]);
  });

  it("resumes from a saved (JSON) state with the same result as one pass", () => {
    const all = readings([FLOOR, ROOF, ROOF, ROOF, ROOF, ROOF, FLOOR, FLOOR, FLOOR, FLOOR, ROOF]);
    const whole = trackBayOccupancy(all, CONFIG);
    expect(whole.sessions).toEqual([{ start: minute(1), end: minute(6), durationS: 300 }]);

    // Split inside the session and inside the pending vacancy.
    const first = trackBayOccupancy(all.slice(0, 7), CONFIG);
    expect(first.sessions).toEqual([{ start: minute(1), end: null, durationS: 300 }]);
    const saved = JSON.parse(JSON.stringify(first.state));
    const second = trackBayOccupancy(all.slice(7), CONFIG, saved);
    expect(second.sessions).toEqual(whole.sessions);
    expect(second.state).toEqual(whole.state);
  });

  it("ignores resent and out-of-date readings, and sorts a batch by time", () => {
    const all = readings([FLOOR, ROOF, ROOF, ROOF, FLOOR, FLOOR, FLOOR]);
    const first = trackBayOccupancy(all.slice(0, 5), CONFIG);
    // The resend of minutes 0–4 changes nothing; the rest arrives reversed.
    const second = trackBayOccupancy([...all.slice(0, 5), ...all.slice(5).reverse()], CONFIG, first.state);
    expect(second.sessions).toEqual([{ start: minute(1), end: minute(4), durationS: 180 }]);
  });

  it("does not alter the state passed in and rejects a bad configuration", () => {
    const start = initialBayState();
    trackBayOccupancy(readings([ROOF, ROOF, ROOF]), CONFIG, start);
    expect(start).toEqual(initialBayState());
    expect(() => trackBayOccupancy([], { ...CONFIG, debounce: 0 })).toThrow(RangeError);
    expect(() => trackBayOccupancy([], { ...CONFIG, hysteresisM: -0.1 })).toThrow(RangeError);
  });
});
