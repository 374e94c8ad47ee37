import { describe, it, expect } from "vitest";
import { median, medianAbsoluteDeviation } from "simple-statistics";
import { convertReading } from "@/lib/worker/compute/convert";
import { buildTemperatureSeries } from "@/lib/worker/compute/air-temperature";
import { AIR_TEMPERATURE_UNCERTAINTY_K } from "@/lib/uncertainty/air-temperature";
import { channel, practicalSpeed, reading, T0 } from "./pipeline-fixtures";

const convert = (r: Parameters<typeof reading>[0], c = channel(), siteSeries = null as ReturnType<typeof buildTemperatureSeries> | null) =>
  convertReading({ reading: reading(r), channel: c, siteSeries });

describe("convert: echo time to distance", () => {
  // REFERENCES.md §2 [computed]: d = c·t/2 with c = 331.3·√(1+T/273.15), to ±0.00001 m.
  it.each([
    [5831, 20, 1.00064],
    [5800, 20, 0.99532],
    [11662, 20, 2.00128],
    [2915.5, 0, 0.48295],
    [23300, 20, 3.99845],
    [1000, -10, 0.16259],
    [17500, 35, 3.079],
  ])("%d µs at %d °C is %d m", (echoUs, tempC, metres) => {
    const m = convert({ echoUs, airTempC: tempC });
    expect(m.status).toBe("ok");
    expect(Math.abs((m.distanceM as number) - metres)).toBeLessThanOrEqual(0.00001);
    expect(m).toMatchObject({ tofUs: echoUs, airTempC: tempC, tempSource: "reading", soundModel: "dry" });
  });

  it("uses Cramer (1993) when the site gives a humidity: 343.987 m/s at 20 °C and 50 % RH (REFERENCES.md §1, computed)", () => {
    const m = convert({ echoUs: 5831, airTempC: 20 }, channel({ site: { id: "site-1", airTempC: null, humidityPct: 50 } }));
    expect(m.soundModel).toBe("cramer");
    expect(Math.abs((m.speedOfSoundMs as number) - 343.987)).toBeLessThan(0.0005);
    expect(Math.abs((m.distanceM as number) - (343.987 * 5831e-6) / 2)).toBeLessThan(0.000001);
  });
});

describe("convert: timer captures", () => {
  const capture = (prescaler: number, maxRangeM = 4) => channel({ maxRangeM, device: { profile: "capture", clockHz: 16_000_000, prescaler, timerBits: 16 } });

  it("turns ticks at 16 MHz / 8 (0.5 µs a tick) into time (REFERENCES.md §2)", () => {
    const m = convert({ ticks: 11662, overflows: 0, airTempC: 20 }, capture(8));
    expect(m.tofUs).toBe(5831);
    expect(Math.abs((m.distanceM as number) - 1.00064)).toBeLessThanOrEqual(0.00001);
  });

  it("adds whole wraps of 2^16 ticks: one wrap at 16 MHz / 8 is 32.768 ms, 5.62 m of range (REFERENCES.md §2)", () => {
    const m = convert({ ticks: 0, overflows: 1, airTempC: 20 }, capture(8, 10));
    expect(m.tofUs).toBe(32768);
    expect(Math.abs((m.distanceM as number) - 5.62)).toBeLessThan(0.005);
    // Beyond the channel's range the same echo is "no echo".
    expect(convert({ ticks: 0, overflows: 1, airTempC: 20 }, capture(8, 4)).status).toBe("no_echo");
  });

  it("counts the tick resolution into the uncertainty: 0.686 mm a tick at prescaler 64 (REFERENCES.md §2), q/√12 (GUM §4.3.7)", () => {
    const m = convert({ ticks: 1458, overflows: 0, airTempC: 20 }, capture(64));
    const tick = 0.000686 / Math.sqrt(12);
    const temperature = ((m.rawDistanceM as number) * AIR_TEMPERATURE_UNCERTAINTY_K.reading) / (2 * 293.15);
    // The transducer's default ±3 mm (from memory, REFERENCES.md §7), rectangular: 3/√3 mm (GUM §4.3.7).
    const transducer = 0.003 / Math.sqrt(3);
    expect(Math.abs((m.uncertaintyM as number) - Math.hypot(tick, temperature, transducer))).toBeLessThan(0.000002);
  });

  it("says invalid_value for a tick count the timer cannot hold, invalid_config for a timer it does not know", () => {
    expect(convert({ ticks: 65536, airTempC: 20 }, capture(8)).status).toBe("invalid_value");
    expect(convert({ ticks: 100 }, channel({ device: { profile: "capture", clockHz: null, prescaler: 8, timerBits: 16 } })).status).toBe("invalid_config");
  });
});

describe("convert: bursts", () => {
  it("takes the median and rates the spread (MAD), like simple-statistics", () => {
    const samples = [5830, 5832, 6410, 5829, 5831];
    const m = convert({ samplesUs: samples, airTempC: 20 });
    expect(m.status).toBe("ok");
    expect(m.tofUs).toBe(median(samples));
    expect(m.spreadUs).toBe(medianAbsoluteDeviation(samples));
    expect(m.burstN).toBe(5);
  });

  it("marks a burst whose spread is wider than 1 cm noisy", () => {
    const m = convert({ samplesUs: [5831, 5981, 5681, 5991, 5691], airTempC: 20 });
    expect(m.status).toBe("noisy");
    expect(m.distanceM).not.toBeNull();
  });
});

describe("convert: air temperature by precedence (PRODUCT.md)", () => {
  const series = buildTemperatureSeries([
    { atMs: T0 - 30 * 60_000, airTempC: 10 },
    { atMs: T0 + 30 * 60_000, airTempC: 20 },
  ]);
  const site = { id: "site-1", airTempC: 5, humidityPct: null };

  it("takes the reading's own value first", () => {
    expect(convert({ echoUs: 5831, airTempC: 12 }, channel({ site }), series)).toMatchObject({ tempSource: "reading", airTempC: 12 });
  });

  it("then the site's samples, interpolated in time", () => {
    const m = convert({ echoUs: 5831 }, channel({ site }), series);
    expect(m).toMatchObject({ tempSource: "site_samples", airTempC: 15 });
    expect(Math.abs((m.speedOfSoundMs as number) - practicalSpeed(15))).toBeLessThan(1e-9);
  });

  it("then the site's fixed value, then 20 °C", () => {
    expect(convert({ echoUs: 5831 }, channel({ site }))).toMatchObject({ tempSource: "site_fixed", airTempC: 5 });
    expect(convert({ echoUs: 5831 })).toMatchObject({ tempSource: "default", airTempC: 20 });
  });

  it("passes over an impossible reading temperature and says so", () => {
    const m = convert({ echoUs: 5831, airTempC: 150 }, channel({ site }));
    expect(m).toMatchObject({ tempSource: "site_fixed", airTempC: 5 });
    expect(m.statusDetail).toMatch(/150/);
  });

  it("is less certain with a guessed temperature: a 20 K error is about 7 cm at 2 m (REFERENCES.md §2, computed)", () => {
    const guessed = convert({ echoUs: 11662 });
    const measured = convert({ echoUs: 11662, airTempC: 20 });
    expect(guessed.uncertaintyM as number).toBeGreaterThan(measured.uncertaintyM as number);
    // Default source: 10 K standard uncertainty, half of the 20 K example, so about 3.4 cm.
    expect(Math.abs((guessed.uncertaintyM as number) - 0.07 / 2)).toBeLessThan(0.002);
  });
});

describe("convert: calibration, face offset and range", () => {
  it("applies scale, then offset, then the face offset", () => {
    const raw = convert({ echoUs: 5831, airTempC: 20 });
    const m = convert({ echoUs: 5831, airTempC: 20 }, channel({ calibrationScale: 1.01, calibrationOffsetM: -0.005, faceOffsetM: 0.03 }));
    expect(m.rawDistanceM).toBe(raw.distanceM);
    expect(Math.abs((m.distanceM as number) - (1.01 * (raw.distanceM as number) - 0.005 - 0.03))).toBeLessThan(1e-12);
  });

  it("refuses a calibration scale of zero as invalid_config", () => {
    expect(convert({ echoUs: 5831 }, channel({ calibrationScale: 0 })).status).toBe("invalid_config");
  });

  it("sorts out too close, no echo and beyond range", () => {
    expect(convert({ echoUs: 100, airTempC: 20 }).status).toBe("too_close");
    expect(convert({ echoUs: 0 }).status).toBe("no_echo");
    expect(convert({ echoUs: 37000 }).status).toBe("no_echo");
    const beyond = convert({ echoUs: 23300, airTempC: 20 }, channel({ maxRangeM: 3 }));
    expect(beyond.status).toBe("no_echo");
    expect(beyond.statusDetail).toMatch(/beyond/);
  });
});

describe("convert: coded profiles and bad input", () => {
  it("decodes pulse-coded distance with no temperature (PRODUCT.md)", () => {
    const m = convert({ pulseUs: 1500 }, channel({ device: { profile: "pulse_coded", usPerMm: 1 } }));
    expect(m).toMatchObject({ status: "ok", distanceM: 1.5, tofUs: null, airTempC: null, tempSource: null });
  });

  it("decodes duty-coded distance: zero + duty · span (PRODUCT.md)", () => {
    const m = convert({ highUs: 412, periodUs: 1000 }, channel({ device: { profile: "duty_coded", zeroM: 0.2, spanM: 5 } }));
    expect(m.status).toBe("ok");
    expect(Math.abs((m.distanceM as number) - 2.26)).toBeLessThan(1e-12);
    expect(m.rawValue).toBe(0.412);
  });

  it("says why it cannot convert, never throws", () => {
    const cases: [Parameters<typeof reading>[0], ReturnType<typeof channel> | null, string][] = [
      [{ echoUs: 5831 }, null, "invalid_config"],
      [{ ticks: 100 }, channel(), "invalid_value"],
      [{ airTempC: 20 }, channel(), "invalid_value"],
      [{ pulseUs: 100 }, channel({ device: { profile: "pulse_coded" } }), "invalid_config"],
      [{ echoUs: 100 }, channel({ device: { profile: "pulse_coded", usPerMm: 1 } }), "invalid_value"],
      [{ highUs: 0, periodUs: 1000 }, channel({ device: { profile: "duty_coded", zeroM: 0, spanM: 5 } }), "invalid_value"],
      [{ highUs: 500, periodUs: 1000 }, channel({ device: { profile: "duty_coded", zeroM: null, spanM: 5 } }), "invalid_config"],
      [{ samplesUs: [5831, Number.NaN] }, channel(), "invalid_value"],
      [{ echoUs: -1 }, channel(), "invalid_value"],
    ];
    for (const [fields, c, status] of cases) {
      const m = convertReading({ reading: reading(fields), channel: c, siteSeries: null });
      expect(m.status, JSON.stringify(fields)).toBe(status);
      expect(m.statusDetail).toBeTruthy();
      expect(m.levelM).toBeNull();
    }
  });
});
