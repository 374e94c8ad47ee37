import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  levelForVolume,
  tankCapacity,
  tankHeight,
  volumeAtLevel,
  type HorizontalCylinderGeometry,
  type HorizontalHeads,
  type StrappingGeometry,
  type TankGeometry,
  type VerticalBottom,
  type VerticalCylinderGeometry,
} from "@/lib/geometry/tank-volume";

// Properties of tank volumes that hold for every size, not only the published examples of
// tank-volume.test.ts. Each names where it comes from; "computed" means it follows from the
// published formulas of REFERENCES.md §3 (and plain solid geometry), not from this code.

const HEADS: readonly HorizontalHeads[] = ["flat", "hemispherical", "ellipsoidal"];
const BOTTOMS: readonly VerticalBottom[] = ["flat", "cone", "ellipsoidal"];

// Sizes from a garden water butt to a road tanker, metres.
const size = (min: number, max: number) => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });
const fraction = fc.double({ min: 0, max: 1, noNaN: true });

const horizontal = (heads: HorizontalHeads): fc.Arbitrary<HorizontalCylinderGeometry> =>
  fc.record({ diameter_m: size(0.2, 5), length_m: size(0.1, 20), headRatio: size(0.05, 1) }).map(({ diameter_m, length_m, headRatio }) => ({
    shape: "horizontal_cylinder" as const,
    diameter_m,
    length_m,
    heads,
    // Ellipsoidal heads from shallow to deeper than a hemisphere (Jones 2002 allows any depth a).
    ...(heads === "ellipsoidal" ? { head_depth_m: headRatio * diameter_m } : {}),
  }));

const vertical = (bottom: VerticalBottom): fc.Arbitrary<VerticalCylinderGeometry> =>
  fc.record({ diameter_m: size(0.2, 5), height_m: size(0.1, 10), bottom_depth_m: size(0.01, 2) }).map((g) => ({ shape: "vertical_cylinder" as const, bottom, ...g }));

const rectangular: fc.Arbitrary<TankGeometry> = fc
  .record({ length_m: size(0.1, 10), width_m: size(0.1, 10), height_m: size(0.1, 5) })
  .map((g) => ({ shape: "rectangular" as const, ...g }));

// A strapping table as a gauger writes it: levels and volumes both rising, rows in any order.
const strapping: fc.Arbitrary<StrappingGeometry> = fc
  .array(fc.tuple(size(0.001, 0.5), size(0.001, 2000)), { minLength: 2, maxLength: 12 })
  .chain((steps) => {
    let level = 0;
    let volume = 0;
    const points = steps.map(([dl, dv]) => ({ level_m: (level += dl), volume_l: (volume += dv) }));
    return fc.shuffledSubarray(points, { minLength: points.length, maxLength: points.length });
  })
  .map((points) => ({ shape: "strapping" as const, points: [{ level_m: 0, volume_l: 0 }, ...points] }));

// How close double precision can get. The circular segment of a horizontal tank uses acos(1 − h/R),
// which loses half the digits next to the bottom and the top (acos(1 − ε) ≈ √(2ε) ≈ 2e-8), so
// volumes there are good to about 1e-8 of the capacity and levels read back from them to about
// (1e-8)^(2/3) ≈ 1e-5 of the diameter (the volume grows as h^1.5 at the bottom); every other
// shape is good to rounding. Both bounds are far below a 0.1 mm timer tick (REFERENCES.md §2)
// and far below what a wrong formula would be off by.
function tolerance(tank: TankGeometry): { volume: number; level: number } {
  const horizontal = tank.shape === "horizontal_cylinder";
  return { volume: (horizontal ? 1e-7 : 1e-9) * tankCapacity(tank), level: (horizontal ? 1e-5 : 1e-9) * tankHeight(tank) };
}

const everyShape: Array<[string, fc.Arbitrary<TankGeometry>]> = [
  ...HEADS.map((h): [string, fc.Arbitrary<TankGeometry>] => [`horizontal, ${h} heads`, horizontal(h)]),
  ...BOTTOMS.map((b): [string, fc.Arbitrary<TankGeometry>] => [`vertical, ${b} bottom`, vertical(b)]),
  ["rectangular", rectangular],
  ["strapping table", strapping],
];

describe("volume rises with level (computed: every cross-section has a non-negative area)", () => {
  it.each(everyShape)("%s", (_name, shape) => {
    fc.assert(
      fc.property(shape, fraction, fraction, (tank, f1, f2) => {
        const [lo, hi] = f1 <= f2 ? [f1, f2] : [f2, f1];
        const h = tankHeight(tank);
        expect(volumeAtLevel(tank, lo * h)).toBeLessThanOrEqual(volumeAtLevel(tank, hi * h) + tolerance(tank).volume);
      }),
      { numRuns: 500 },
    );
  });

  it.each(everyShape)("%s: empty at the bottom, full at the top, never outside 0…capacity", (_name, shape) => {
    fc.assert(
      fc.property(shape, fc.double({ min: -2, max: 3, noNaN: true }), (tank, f) => {
        const v = volumeAtLevel(tank, f * tankHeight(tank));
        expect(v).toBeGreaterThanOrEqual(-tolerance(tank).volume);
        expect(v).toBeLessThanOrEqual(tankCapacity(tank) + tolerance(tank).volume);
      }),
      { numRuns: 300 },
    );
  });
});

describe("horizontal tanks: V(h) + V(D − h) = V(full) (computed: the tank is symmetric about its horizontal axis, so the space above h is the liquid at D − h)", () => {
  it.each(HEADS)("%s heads", (heads) => {
    fc.assert(
      fc.property(horizontal(heads), fraction, (tank, f) => {
        const d = tank.diameter_m;
        const sum = volumeAtLevel(tank, f * d) + volumeAtLevel(tank, d - f * d);
        expect(Math.abs(sum - tankCapacity(tank))).toBeLessThanOrEqual(tolerance(tank).volume);
      }),
      { numRuns: 500 },
    );
  });

  it.each(HEADS)("%s heads: half full at mid-height (the same identity at h = D/2)", (heads) => {
    fc.assert(
      fc.property(horizontal(heads), (tank) => {
        expect(volumeAtLevel(tank, tank.diameter_m / 2)).toBeCloseTo(tankCapacity(tank) / 2, 6);
      }),
    );
  });

  it.each(HEADS)("%s heads: full = shell + heads, π·R²·L + 4/3·π·a·R² (published solid geometry: cylinder and ellipsoid volumes)", (heads) => {
    fc.assert(
      fc.property(horizontal(heads), (tank) => {
        const r = tank.diameter_m / 2;
        const a = heads === "flat" ? 0 : heads === "hemispherical" ? r : tank.head_depth_m!;
        const expected = (Math.PI * r * r * tank.length_m + (4 / 3) * Math.PI * a * r * r) * 1000;
        expect(Math.abs(tankCapacity(tank) - expected)).toBeLessThanOrEqual(1e-9 * expected);
      }),
    );
  });
});

describe("vertical tanks: continuous at the bottom/shell joint (computed: at h = a the bottom's cross-section is the shell's, π·D²/4)", () => {
  it.each(["cone", "ellipsoidal"] as const)("%s bottom: no step in volume, and the rate of filling matches on both sides", (bottom) => {
    fc.assert(
      fc.property(vertical(bottom), (tank) => {
        const a = tank.bottom_depth_m;
        const shellAreaL = ((Math.PI * tank.diameter_m ** 2) / 4) * 1000;
        const eps = a * 1e-6;
        const below = volumeAtLevel(tank, a - eps);
        const at = volumeAtLevel(tank, a);
        const above = volumeAtLevel(tank, a + eps);
        // Both one-sided slopes equal the shell's area to within the curvature over eps.
        expect((at - below) / eps).toBeCloseTo(shellAreaL, -Math.log10(shellAreaL * 1e-4));
        expect((above - at) / eps).toBeCloseTo(shellAreaL, -Math.log10(shellAreaL * 1e-4));
      }),
      { numRuns: 300 },
    );
  });

  it.each(["cone", "ellipsoidal"] as const)("%s bottom: the full bottom holds a/3 (cone) or 2a/3 (half ellipsoid) of its bounding cylinder (published solid geometry)", (bottom) => {
    fc.assert(
      fc.property(vertical(bottom), (tank) => {
        const a = tank.bottom_depth_m;
        const shellAreaL = ((Math.PI * tank.diameter_m ** 2) / 4) * 1000;
        const share = bottom === "cone" ? 1 / 3 : 2 / 3;
        expect(volumeAtLevel(tank, a)).toBeCloseTo(share * a * shellAreaL, 6);
      }),
    );
  });
});

describe("level ↔ volume round trip (computed: levelForVolume is the inverse of volumeAtLevel)", () => {
  // Strapping tables are left out here: between two rows of equal volume no inverse exists.
  const invertible = everyShape.filter(([name]) => name !== "strapping table");

  it.each(invertible)("%s: level → volume → level", (_name, shape) => {
    fc.assert(
      fc.property(shape, fraction, (tank, f) => {
        const h = tankHeight(tank);
        const level = f * h;
        expect(Math.abs(levelForVolume(tank, volumeAtLevel(tank, level)) - level)).toBeLessThanOrEqual(tolerance(tank).level);
      }),
      { numRuns: 500 },
    );
  });

  it.each(everyShape)("%s: volume → level → volume", (_name, shape) => {
    fc.assert(
      fc.property(shape, fraction, (tank, f) => {
        const capacity = tankCapacity(tank);
        const litres = f * capacity;
        expect(Math.abs(volumeAtLevel(tank, levelForVolume(tank, litres)) - litres)).toBeLessThanOrEqual(tolerance(tank).volume);
      }),
      { numRuns: 500 },
    );
  });
});
