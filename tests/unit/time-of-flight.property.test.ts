import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { captureDifference, captureToMicroseconds } from "@/lib/physics/time-of-flight";

// The capture timer's wrap, for every counter width the module takes (1–32 bits). Source: REFERENCES.md §2,
// "the difference of two captures is taken modulo 2^bits" and t = (overflows · 2^bits + ticks) · prescaler / f_clock
// [published arithmetic]; the expected values below are the unwrapped counts, worked out with BigInt
// independently of the module's Number arithmetic.

const WIDTHS = Array.from({ length: 32 }, (_, i) => i + 1);

/** A count 0 … 2^bits − 1. */
const ticksOf = (bits: number) => fc.bigInt({ min: 0n, max: (1n << BigInt(bits)) - 1n });

describe("elapsed ticks across a counter overflow equal the unwrapped difference (REFERENCES.md §2)", () => {
  it.each(WIDTHS)("%i-bit counter", (bits) => {
    const wrap = 1n << BigInt(bits);
    fc.assert(
      fc.property(ticksOf(bits), ticksOf(bits), (start, elapsed) => {
        // The free-running counter reads start, then wraps (or not) and reads end.
        const end = (start + elapsed) % wrap;
        const result = captureDifference(Number(start), Number(end), bits);
        expect(result).toEqual({ ok: true, value: Number(elapsed) });
      }),
      { numRuns: 200 },
    );
  });

  it.each(WIDTHS)("%i-bit counter: a capture that wrapped reads as less than one wrap ahead, never negative", (bits) => {
    const wrap = 1n << BigInt(bits);
    fc.assert(
      fc.property(ticksOf(bits), ticksOf(bits), (start, end) => {
        const result = captureDifference(Number(start), Number(end), bits);
        // Unwrapped: end is ahead of start, by one wrap more when the counter overflowed in between.
        const expected = end >= start ? end - start : end + wrap - start;
        expect(result).toEqual({ ok: true, value: Number(expected) });
      }),
      { numRuns: 100 },
    );
  });

  it("refuses counts outside the counter and widths outside 1–32 bits", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 32 }), fc.integer({ min: 0, max: 1000 }), (bits, over) => {
        const wrap = 2 ** bits;
        expect(captureDifference(wrap + over, 0, bits)).toMatchObject({ ok: false, reason: "tick_out_of_range" });
        expect(captureDifference(0, -1 - over, bits)).toMatchObject({ ok: false, reason: "tick_out_of_range" });
      }),
    );
    fc.assert(
      fc.property(fc.oneof(fc.integer({ min: -64, max: 0 }), fc.integer({ min: 33, max: 64 }), fc.double({ min: 1.01, max: 31.99, noNaN: true }).filter((b) => !Number.isInteger(b))), (bits) => {
        expect(captureDifference(0, 0, bits)).toMatchObject({ ok: false, reason: "invalid_timer" });
      }),
    );
  });
});

describe("a capture with overflows counted is the unwrapped tick count (REFERENCES.md §2: t = (overflows · 2^bits + ticks) · prescaler / f_clock)", () => {
  it.each(WIDTHS)("%i-bit counter", (bits) => {
    fc.assert(
      fc.property(
        ticksOf(bits),
        fc.integer({ min: 0, max: 100_000 }),
        fc.constantFrom(1, 8, 64, 256, 1024),
        fc.constantFrom(1_000_000, 8_000_000, 16_000_000, 48_000_000),
        (ticks, overflows, prescaler, clockHz) => {
          const total = BigInt(overflows) * (1n << BigInt(bits)) + ticks;
          const result = captureToMicroseconds({ ticks: Number(ticks), overflows, clockHz, prescaler, timerBits: bits });
          expect(result.ok).toBe(true);
          if (!result.ok) return;
          // Relative tolerance: the product's Number arithmetic against the exact BigInt count.
          const expectedUs = (Number(total) * prescaler * 1e6) / clockHz;
          expect(Math.abs(result.value - expectedUs)).toBeLessThanOrEqual(1e-12 * Math.max(expectedUs, 1));
        },
      ),
      { numRuns: 100 },
    );
  });
});
