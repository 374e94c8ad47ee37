import { describe, it, expect } from "vitest";
import { fraction, number as toNumber } from "mathjs";
import { median, medianAbsoluteDeviation, interquartileRange } from "simple-statistics";
import { speedOfSoundDry } from "@/lib/physics/speed-of-sound";
import {
  distanceFromEcho,
  captureToMicroseconds,
  captureDifference,
  captureResolution,
  pulseCodedDistance,
  dutyCodedDistance,
  summariseBurst,
  applyCalibration,
  type TofResult,
} from "@/lib/physics/time-of-flight";

function value<T>(result: TofResult<T>): T {
  if (!result.ok) throw new Error(`expected ok, got ${result.reason}: ${result.detail}`);
  return result.value;
}

function reason<T>(result: TofResult<T>): string {
  return result.ok ? "ok" : result.reason;
}

// A small seeded generator (mulberry32) so the random checks repeat exactly.
function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const TIMER_16MHZ = { clockHz: 16_000_000, timerBits: 16 };

describe("echo time to distance", () => {
  // REFERENCES.md §2 table [computed]: d = c·t/2 with c = 331.3·√(1+T/273.15), ±0.00001 m.
  it.each([
    [5831, 20, 1.00064],
    [5800, 20, 0.99532],
    [11662, 20, 2.00128],
    [2915.5, 0, 0.48295],
    [23300, 20, 3.99845],
    [1000, -10, 0.16259],
    [17500, 35, 3.079],
  ])("%d µs at %d °C is %d m", (echoUs, tempC, metres) => {
    const d = value(distanceFromEcho(echoUs, speedOfSoundDry(tempC)));
    expect(Math.abs(d - metres)).toBeLessThanOrEqual(0.00001);
  });

  it("agrees with the 'divide microseconds by 58 for centimetres' rule within 1 % at 20 °C (common practice)", () => {
    for (const echoUs of [580, 5800, 11600, 23200]) {
      const cm = value(distanceFromEcho(echoUs, speedOfSoundDry(20))) * 100;
      expect(Math.abs(cm - echoUs / 58) / (echoUs / 58)).toBeLessThan(0.01);
    }
  });

  it("a 20 K temperature error is about 7 cm at 2 m (REFERENCES.md §2, computed)", () => {
    const echoFor2m = 11662; // 2.00128 m at 20 °C, REFERENCES.md §2 table
    const at20 = value(distanceFromEcho(echoFor2m, speedOfSoundDry(20)));
    const at0 = value(distanceFromEcho(echoFor2m, speedOfSoundDry(0)));
    expect(at20 - at0).toBeCloseTo(0.07, 2);
    // dc/dT ≈ 0.6 m/s per K, about 0.18 % per K (REFERENCES.md §2, computed; "about": 0.183 % at 0 °C, 0.172 % at 20 °C).
    for (const t of [0, 10, 20]) {
      const slope = speedOfSoundDry(t + 0.5) - speedOfSoundDry(t - 0.5);
      expect(slope).toBeCloseTo(0.6, 1);
      expect(Math.abs((slope / speedOfSoundDry(t)) * 100 - 0.18)).toBeLessThan(0.01);
    }
  });

  it("refuses impossible inputs with a reason", () => {
    expect(reason(distanceFromEcho(-1, 343))).toBe("negative_time");
    expect(reason(distanceFromEcho(Number.NaN, 343))).toBe("not_finite");
    expect(reason(distanceFromEcho(5831, Number.POSITIVE_INFINITY))).toBe("not_finite");
    expect(reason(distanceFromEcho(5831, 0))).toBe("non_positive_speed");
    expect(value(distanceFromEcho(0, 343))).toBe(0);
  });
});

describe("timer captures", () => {
  // REFERENCES.md §2 [computed]: t = (overflows·2^bits + ticks)·prescaler/f; at 16 MHz, prescaler 8, 0.5 µs a tick.
  it("turns ticks and overflows into microseconds", () => {
    const capture = { ...TIMER_16MHZ, prescaler: 8 };
    expect(value(captureToMicroseconds({ ...capture, ticks: 11662, overflows: 0 }))).toBe(5831);
    expect(value(captureToMicroseconds({ ...capture, ticks: 0, overflows: 1 }))).toBe(32768);
    // 23 300 µs (3.99845 m at 20 °C, REFERENCES.md §2) still fits inside one 32.768 ms wrap: 46 600 ticks.
    expect(value(captureToMicroseconds({ ...capture, ticks: 46600, overflows: 0 }))).toBe(23300);
    expect(value(captureToMicroseconds({ ...capture, ticks: 100, overflows: 2 }))).toBe(2 * 32768 + 50);
    // prescaler 64: 4 µs a tick.
    expect(value(captureToMicroseconds({ ...TIMER_16MHZ, prescaler: 64, ticks: 1, overflows: 1 }))).toBe(262144 + 4);
  });

  it("refuses captures that the timer cannot produce", () => {
    const capture = { ...TIMER_16MHZ, prescaler: 8 };
    expect(reason(captureToMicroseconds({ ...capture, ticks: 65536, overflows: 0 }))).toBe("tick_out_of_range");
    expect(reason(captureToMicroseconds({ ...capture, ticks: -1, overflows: 0 }))).toBe("tick_out_of_range");
    expect(reason(captureToMicroseconds({ ...capture, ticks: 1.5, overflows: 0 }))).toBe("tick_out_of_range");
    expect(reason(captureToMicroseconds({ ...capture, ticks: 1, overflows: -1 }))).toBe("invalid_overflows");
    expect(reason(captureToMicroseconds({ ...capture, prescaler: 0, ticks: 1, overflows: 0 }))).toBe("invalid_timer");
    expect(reason(captureToMicroseconds({ ...capture, clockHz: 0, ticks: 1, overflows: 0 }))).toBe("invalid_timer");
    expect(reason(captureToMicroseconds({ ...capture, timerBits: 0, ticks: 0, overflows: 0 }))).toBe("invalid_timer");
    expect(reason(captureToMicroseconds({ ...capture, timerBits: 33, ticks: 0, overflows: 0 }))).toBe("invalid_timer");
  });

  it("takes the difference of two 16-bit captures modulo 2^16 (REFERENCES.md §2)", () => {
    expect(value(captureDifference(1000, 12662, 16))).toBe(11662);
    // Wrapped once between the edges: 65 000 → 500 is 1 036 ticks, not −64 500.
    expect(value(captureDifference(65000, 500, 16))).toBe(1036);
    expect(value(captureDifference(65535, 0, 16))).toBe(1);
    expect(value(captureDifference(42, 42, 16))).toBe(0);
    expect(value(captureDifference(250, 5, 8))).toBe(11);
    expect(reason(captureDifference(0, 65536, 16))).toBe("tick_out_of_range");
    expect(reason(captureDifference(0, 1, 0))).toBe("invalid_timer");
  });

  it("16 MHz, prescaler 8: 0.5 µs and 0.0858 mm a tick, wrap every 32.768 ms ≈ 5.62 m (REFERENCES.md §2, computed)", () => {
    const r = value(captureResolution({ ...TIMER_16MHZ, prescaler: 8, speedMs: speedOfSoundDry(20) }));
    expect(r.tickUs).toBe(0.5);
    expect(r.mmPerTick).toBeCloseTo(0.0858, 4);
    expect(r.wrapUs).toBe(32768);
    expect(r.wrapRangeM).toBeCloseTo(5.62, 2);
  });

  it("16 MHz, prescaler 64: 4 µs and 0.686 mm a tick, wrap every 262.144 ms (REFERENCES.md §2, computed)", () => {
    const r8 = value(captureResolution({ ...TIMER_16MHZ, prescaler: 8, speedMs: speedOfSoundDry(20) }));
    const r = value(captureResolution({ ...TIMER_16MHZ, prescaler: 64, speedMs: speedOfSoundDry(20) }));
    expect(r.tickUs).toBe(4);
    expect(r.mmPerTick).toBeCloseTo(0.686, 3);
    expect(r.wrapUs).toBe(262144);
    // Eight times the prescaler, eight times the span.
    expect(r.wrapRangeM / r8.wrapRangeM).toBeCloseTo(8, 12);
  });

  it("refuses a resolution without a usable speed", () => {
    expect(reason(captureResolution({ ...TIMER_16MHZ, prescaler: 8, speedMs: 0 }))).toBe("non_positive_speed");
    expect(reason(captureResolution({ ...TIMER_16MHZ, prescaler: 8, speedMs: Number.NaN }))).toBe("not_finite");
  });
});

describe("coded outputs", () => {
  it("a pulse of 2/c µs per mm is the raw echo, matching REFERENCES.md §2 (computed)", () => {
    const usPerMm = 2e3 / speedOfSoundDry(20); // round trip of 1 mm, µs
    expect(Math.abs(value(pulseCodedDistance(5831, usPerMm)) - 1.00064)).toBeLessThanOrEqual(0.00001);
    expect(Math.abs(value(pulseCodedDistance(23300, usPerMm)) - 3.99845)).toBeLessThanOrEqual(0.00001);
  });

  it("58 µs per cm gives 1 m for 5 800 µs (common practice: divide by 58 for centimetres)", () => {
    expect(value(pulseCodedDistance(5800, 5.8))).toBeCloseTo(1, 12);
  });

  it("refuses a pulse it cannot scale", () => {
    expect(reason(pulseCodedDistance(-5, 5.8))).toBe("negative_time");
    expect(reason(pulseCodedDistance(5800, 0))).toBe("non_positive_scale");
    expect(reason(pulseCodedDistance(Number.NaN, 5.8))).toBe("not_finite");
  });

  it("duty is high time over period, distance zero + duty · span (definition of duty cycle; exact rational arithmetic in mathjs)", () => {
    const input = { highUs: 375, periodUs: 1000, zeroM: 0.25, spanM: 4 };
    const r = value(dutyCodedDistance(input));
    const duty = fraction(input.highUs, input.periodUs);
    expect(r.duty).toBe(toNumber(duty));
    expect(r.lowUs).toBe(input.periodUs - input.highUs);
    expect(r.distanceM).toBeCloseTo(toNumber(fraction(input.zeroM).add(duty.mul(fraction(input.spanM)))), 12);
  });

  it("refuses a line that never toggled or a non-positive period", () => {
    const base = { zeroM: 0, spanM: 4 };
    expect(reason(dutyCodedDistance({ ...base, highUs: 1000, periodUs: 1000 }))).toBe("duty_out_of_range");
    expect(reason(dutyCodedDistance({ ...base, highUs: 1200, periodUs: 1000 }))).toBe("duty_out_of_range");
    expect(reason(dutyCodedDistance({ ...base, highUs: 0, periodUs: 1000 }))).toBe("duty_out_of_range");
    expect(reason(dutyCodedDistance({ ...base, highUs: 10, periodUs: 0 }))).toBe("non_positive_period");
    expect(reason(dutyCodedDistance({ ...base, highUs: 10, periodUs: -5 }))).toBe("non_positive_period");
    expect(reason(dutyCodedDistance({ ...base, highUs: Number.NaN, periodUs: 1000 }))).toBe("not_finite");
  });
});

describe("burst summary", () => {
  it("takes the median and the median absolute deviation, shrugging off one stray echo (REFERENCES.md §2 echo times)", () => {
    const burst = [5831, 5800, 5831, 5831, 11662];
    const s = value(summariseBurst(burst));
    expect(s).toEqual({ medianUs: 5831, spreadUs: 0, n: 5 });
  });

  it("matches simple-statistics median and medianAbsoluteDeviation on seeded random bursts", () => {
    const random = seededRandom(20240611);
    for (let trial = 0; trial < 50; trial++) {
      const n = 1 + Math.floor(random() * 12);
      const burst = Array.from({ length: n }, () => 5000 + random() * 2000);
      const s = value(summariseBurst(burst));
      expect(s.n).toBe(n);
      expect(s.medianUs).toBeCloseTo(median(burst), 9);
      expect(s.spreadUs).toBeCloseTo(medianAbsoluteDeviation(burst), 9);
    }
  });

  it("reports the MAD, not the interquartile range (simple-statistics)", () => {
    const burst = [1, 1, 2, 2, 4, 6, 9]; // simple-statistics' own example: MAD 1
    expect(value(summariseBurst(burst)).spreadUs).toBe(1);
    expect(interquartileRange(burst)).not.toBe(1);
  });

  it("does not reorder the caller's array", () => {
    const burst = [3, 1, 2];
    summariseBurst(burst);
    expect(burst).toEqual([3, 1, 2]);
  });

  it("refuses an empty or broken burst", () => {
    expect(reason(summariseBurst([]))).toBe("empty_burst");
    expect(reason(summariseBurst([5831, Number.NaN]))).toBe("not_finite");
    expect(reason(summariseBurst([5831, -1]))).toBe("negative_time");
  });
});

describe("calibration", () => {
  it("scales then offsets: a speed ratio as the scale re-states a 20 °C distance at 0 °C (REFERENCES.md §2 rows)", () => {
    const at20 = value(distanceFromEcho(5831, speedOfSoundDry(20))); // 1.00064 m
    // Half of the 5 831 µs echo at 0 °C is the 2 915.5 µs row: 0.48295 m.
    const scale = (speedOfSoundDry(0) / speedOfSoundDry(20)) * 0.5;
    expect(Math.abs(value(applyCalibration(at20, { offsetM: 0, scale })) - 0.48295)).toBeLessThanOrEqual(0.00001);
    expect(value(applyCalibration(at20, { offsetM: -0.01, scale: 1 }))).toBeCloseTo(at20 - 0.01, 12);
    expect(value(applyCalibration(2, { offsetM: 0.1, scale: 1.5 }))).toBeCloseTo(3.1, 12);
  });

  it("refuses a scale that would flip or erase the distance", () => {
    expect(reason(applyCalibration(1, { offsetM: 0, scale: 0 }))).toBe("non_positive_scale");
    expect(reason(applyCalibration(1, { offsetM: 0, scale: -1 }))).toBe("non_positive_scale");
    expect(reason(applyCalibration(1, { offsetM: Number.NaN, scale: 1 }))).toBe("not_finite");
  });
});
