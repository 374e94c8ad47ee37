import { describe, it, expect } from "vitest";
import { echoMicroseconds, encodeCapture, encodeDuty, encodePulse, NO_ECHO_US, roundEchoUs } from "@/workers/simulation/encoding";
import { captureToMicroseconds, distanceFromEcho, dutyCodedDistance, pulseCodedDistance } from "@/lib/physics/time-of-flight";

// Written out here rather than imported, so the check does not lean on the product's own formula:
// c = 331.3·√(1 + T/273.15) m/s, REFERENCES.md §1 (the "practical formula for dry air").
const speed = (tempC: number) => 331.3 * Math.sqrt(1 + tempC / 273.15);
// distance = c·t/2 for a round trip, REFERENCES.md §2 [published physics].
const distanceOf = (echoUs: number, tempC: number) => (speed(tempC) * echoUs * 1e-6) / 2;

const TIMER = { clockHz: 16_000_000, prescaler: 8, timerBits: 16 };

describe("echo encoding against REFERENCES.md §2 (echo time to distance)", () => {
  // Rows of REFERENCES.md §2: echo high time, temperature, distance [computed from the published formula].
  const rows: [number, number, number][] = [
    [5831, 20, 1.00064],
    [5800, 20, 0.99532],
    [11662, 20, 2.00128],
    [2915.5, 0, 0.48295],
    [23300, 20, 3.99845],
    [1000, -10, 0.16259],
    [17500, 35, 3.079],
  ];
  it.each(rows)("%s µs at %s °C is the echo of %s m", (echoUs, tempC, distanceM) => {
    // The table gives distances to 10 µm: about 0.06 µs of echo time either way.
    expect(Math.abs(echoMicroseconds(distanceM, speed(tempC)) - echoUs)).toBeLessThan(0.07);
  });

  it("an echo encoded at 20 °C decodes to the intended distance within the half-microsecond rounding", () => {
    for (let mm = 20; mm <= 4000; mm += 37) {
      const d = mm / 1000;
      const sent = roundEchoUs(echoMicroseconds(d, speed(20)));
      expect(Number.isInteger(sent * 2)).toBe(true);
      // Half of 0.5 µs at 343.2 m/s over the round trip is 0.043 mm.
      expect(Math.abs(distanceOf(sent, 20) - d)).toBeLessThan(0.000044);
      const decoded = distanceFromEcho(sent, speed(20));
      expect(decoded.ok && Math.abs(decoded.value - d)).toBeLessThan(0.000044);
    }
  });

  it("no echo is a long pulse of about 38 ms (common practice: roughly 36–38 ms)", () => {
    expect(NO_ECHO_US).toBeGreaterThanOrEqual(36_000);
    expect(NO_ECHO_US).toBeLessThanOrEqual(38_000);
  });
});

describe("capture encoding: t = (overflows·2^bits + ticks)·prescaler/f (REFERENCES.md §2, published arithmetic)", () => {
  const decodeUs = ({ ticks, overflows }: { ticks: number; overflows: number }) => ((overflows * 2 ** 16 + ticks) * 8 * 1e6) / 16_000_000;

  it("16 MHz with prescaler 8 ticks every 0.5 µs: 11 662 µs is 23 324 ticks without overflow", () => {
    expect(encodeCapture(11662, TIMER)).toEqual({ ticks: 23324, overflows: 0 });
  });

  it("a 16-bit timer wraps every 32.768 ms, so a 38 ms no-echo pulse overflows once (REFERENCES.md §2)", () => {
    const c = encodeCapture(NO_ECHO_US, TIMER);
    expect(c.overflows).toBe(1);
    expect(c.ticks).toBe(76000 - 65536);
    expect(decodeUs(c)).toBeCloseTo(38000, 6);
  });

  it("round-trips every distance to within half a tick, by the published formula and by the product's decoder", () => {
    for (let mm = 20; mm <= 6500; mm += 53) {
      const echoUs = echoMicroseconds(mm / 1000, speed(20));
      const c = encodeCapture(echoUs, TIMER);
      expect(c.ticks).toBeLessThan(2 ** 16);
      expect(Math.abs(decodeUs(c) - echoUs)).toBeLessThanOrEqual(0.25 + 1e-9);
      const product = captureToMicroseconds({ ...c, clockHz: 16e6, prescaler: 8, timerBits: 16 });
      expect(product.ok && Math.abs(product.value - echoUs)).toBeLessThanOrEqual(0.25 + 1e-9);
      // 0.0858 mm of range a tick at 20 °C (REFERENCES.md §2): half a tick is within 0.043 mm.
      expect(Math.abs(distanceOf(decodeUs(c), 20) - mm / 1000)).toBeLessThan(0.000043);
    }
  });
});

describe("pulse- and duty-coded encodings", () => {
  it("5.8 µs per mm agrees with 'divide microseconds by 58 to get centimetres' (common practice)", () => {
    const { pulse_us } = encodePulse(1.5, 5.8);
    expect(pulse_us / 58).toBeCloseTo(150, 6);
    const decoded = pulseCodedDistance(pulse_us, 5.8);
    expect(decoded.ok && decoded.value).toBeCloseTo(1.5, 6);
  });

  it("duty = (d − zero)/span decodes as zero + duty·span (PRODUCT.md, signal profile duty_coded)", () => {
    const scale = { zeroM: 0.25, spanM: 4.75, periodUs: 1000 };
    for (let mm = 300; mm <= 4950; mm += 61) {
      const { high_us, period_us } = encodeDuty(mm / 1000, scale);
      expect(high_us).toBeGreaterThan(0);
      expect(high_us).toBeLessThan(period_us);
      // 0.1 µs of 1000 µs is 0.475 mm of span; rounding is half of that.
      expect(Math.abs(scale.zeroM + (high_us / period_us) * scale.spanM - mm / 1000)).toBeLessThan(0.00024);
      const decoded = dutyCodedDistance({ highUs: high_us, periodUs: period_us, zeroM: 0.25, spanM: 4.75 });
      expect(decoded.ok && Math.abs(decoded.value.distanceM - mm / 1000)).toBeLessThan(0.00024);
    }
  });

  it("keeps the duty strictly between 0 and 1 beyond the span, as a line that never toggles reads as a fault", () => {
    const scale = { zeroM: 0.25, spanM: 4.75, periodUs: 1000 };
    expect(encodeDuty(0.1, scale).high_us).toBeGreaterThan(0);
    expect(encodeDuty(9, scale).high_us).toBeLessThan(1000);
  });
});
