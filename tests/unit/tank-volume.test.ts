import { describe, it, expect } from "vitest";
import { evaluate, unit, type Unit } from "mathjs";
import {
  volumeAtLevel,
  tankHeight,
  tankCapacity,
  levelForVolume,
  type TankGeometry,
  type HorizontalCylinderGeometry,
  type VerticalCylinderGeometry,
} from "@/lib/geometry/tank-volume";

// US gallon = 231 in³ (REFERENCES.md §3), in litres; mathjs's "gal" is the same US liquid gallon.
const INCH_M = 0.0254;
const GALLON_L = 231 * INCH_M ** 3 * 1000;
const inches = (n: number) => n * INCH_M;
const gallons = (litres: number) => litres / GALLON_L;

function horizontalJones(heads: HorizontalCylinderGeometry["heads"], headDepthIn?: number): HorizontalCylinderGeometry {
  // Jones (2002) horizontal example: D = 108 in, straight length L = 156 in.
  return {
    shape: "horizontal_cylinder",
    diameter_m: inches(108),
    length_m: inches(156),
    heads,
    ...(headDepthIn === undefined ? {} : { head_depth_m: inches(headDepthIn) }),
  };
}

function verticalJones(bottom: VerticalCylinderGeometry["bottom"]): VerticalCylinderGeometry {
  // Jones (2002) vertical example: D = 132 in, bottom depth a = 33 in; a 99 in shell makes the tank 132 in tall in all.
  return { shape: "vertical_cylinder", diameter_m: inches(132), height_m: inches(99), bottom, bottom_depth_m: inches(33) };
}

// Machinery's Handbook, 31st ed., "Contents of Cylindrical Tanks": 20 ft long, 6 ft diameter, flat ends.
const HANDBOOK_TANK: TankGeometry = { shape: "horizontal_cylinder", diameter_m: inches(72), length_m: inches(240), heads: "flat" };

describe("units", () => {
  it("the test's gallon is mathjs's US gallon, 231 in³ (REFERENCES.md §3)", () => {
    expect(unit(1, "gal").toNumber("L")).toBeCloseTo(GALLON_L, 12);
    expect((evaluate("231 inch^3") as Unit).toNumber("L")).toBeCloseTo(GALLON_L, 12);
  });
});

describe("horizontal cylinder, flat ends — Machinery's Handbook", () => {
  it("holds 4 230 gal full (published) and 4 230.13 gal exactly (REFERENCES.md §3, computed)", () => {
    expect(Math.round(gallons(tankCapacity(HANDBOOK_TANK)))).toBe(4230);
    expect(gallons(tankCapacity(HANDBOOK_TANK))).toBeCloseTo(4230.13, 2);
    expect(tankHeight(HANDBOOK_TANK)).toBeCloseTo(inches(72), 12);
  });

  it("holds 2 115 gal half full (published)", () => {
    expect(Math.round(gallons(volumeAtLevel(HANDBOOK_TANK, inches(36))))).toBe(2115);
  });

  it("reaches 1 000 gal at 20⅝ in (published, to the table's ⅛ in) and 20.611 in exactly (computed)", () => {
    const levelIn = levelForVolume(HANDBOOK_TANK, 1000 * GALLON_L) / INCH_M;
    expect(Math.abs(levelIn - 20.625)).toBeLessThan(1 / 16);
    expect(levelIn).toBeCloseTo(20.611, 3);
    // About 70 gal an inch at that depth, so the published ⅛-in rounding is worth about 1 gal.
    expect(Math.abs(gallons(volumeAtLevel(HANDBOOK_TANK, inches(20.625))) - 1000)).toBeLessThan(2);
  });

  it("reaches 3 000 gal at 48.06 in (REFERENCES.md §3, computed)", () => {
    expect(levelForVolume(HANDBOOK_TANK, 3000 * GALLON_L) / INCH_M).toBeCloseTo(48.06, 2);
  });
});

describe("horizontal cylinder with heads — Jones (2002)", () => {
  it("ellipsoidal heads a = 42 in, h = 36 in: 2 380.957 gal (Jones 2002 via fluids geometry.py docstring)", () => {
    expect(gallons(volumeAtLevel(horizontalJones("ellipsoidal", 42), inches(36)))).toBeCloseTo(2380.957, 3);
  });

  // The docstring gives h = 36 in only; these levels are computed from the same Jones (2002) formula.
  it("ellipsoidal heads a = 42 in, h = 84 in: 7 103.445 gal; full 8 407.392 gal; h = 54 in: 4 203.696 gal (computed, Jones 2002)", () => {
    const tank = horizontalJones("ellipsoidal", 42);
    expect(gallons(volumeAtLevel(tank, inches(84)))).toBeCloseTo(7103.445, 3);
    expect(gallons(tankCapacity(tank))).toBeCloseTo(8407.392, 3);
    expect(gallons(volumeAtLevel(tank, inches(54)))).toBeCloseTo(4203.696, 3);
  });

  it("hemispherical heads (a = R), h = 36 in: 2 545.462 gal (REFERENCES.md §3, computed)", () => {
    expect(gallons(volumeAtLevel(horizontalJones("hemispherical"), inches(36)))).toBeCloseTo(2545.462, 3);
  });

  it("hemispherical heads take their depth from the diameter, whatever head_depth_m says", () => {
    expect(volumeAtLevel(horizontalJones("hemispherical", 10), inches(36))).toBe(volumeAtLevel(horizontalJones("hemispherical"), inches(36)));
  });

  it("flat ends, h = 36 in: 1 805.188 gal (REFERENCES.md §3, computed)", () => {
    expect(gallons(volumeAtLevel(horizontalJones("flat", 42), inches(36)))).toBeCloseTo(1805.188, 3);
  });

  it("full hemispherical and default 2:1 ellipsoidal tanks add a sphere and an ellipsoid (computed from V = 4/3·π·abc)", () => {
    const r = inches(54);
    const shell = Math.PI * r * r * inches(156);
    expect(tankCapacity(horizontalJones("hemispherical"))).toBeCloseTo((shell + (4 / 3) * Math.PI * r ** 3) * 1000, 6);
    // Default head depth D/4 = 27 in, a 2:1 head.
    const twoToOne = horizontalJones("ellipsoidal");
    expect(tankCapacity(twoToOne)).toBeCloseTo((shell + (4 / 3) * Math.PI * inches(27) * r * r) * 1000, 6);
    expect(volumeAtLevel(twoToOne, inches(36))).toBe(volumeAtLevel(horizontalJones("ellipsoidal", 27), inches(36)));
  });
});

describe("vertical cylinder — Jones (2002)", () => {
  it("plain cylinder D = 132 in, h = 24 in: 1 421.80 gal (REFERENCES.md §3, computed)", () => {
    expect(gallons(volumeAtLevel(verticalJones("flat"), inches(24)))).toBeCloseTo(1421.8, 2);
  });

  it("conical bottom a = 33 in, h = 24 in: 250.675 gal (Jones 2002 via fluids geometry.py docstring); h = 60 in: 2 251.176 gal (computed, Jones 2002)", () => {
    expect(gallons(volumeAtLevel(verticalJones("cone"), inches(24)))).toBeCloseTo(250.675, 3);
    expect(gallons(volumeAtLevel(verticalJones("cone"), inches(60)))).toBeCloseTo(2251.176, 3);
  });

  it("ellipsoidal bottom a = 33 in, h = 24 in: 783.358 gal (Jones 2002 via fluids geometry.py docstring); h = 60 in: 2 902.832 gal (computed, Jones 2002)", () => {
    expect(gallons(volumeAtLevel(verticalJones("ellipsoidal"), inches(24)))).toBeCloseTo(783.358, 3);
    expect(gallons(volumeAtLevel(verticalJones("ellipsoidal"), inches(60)))).toBeCloseTo(2902.832, 3);
  });

  it("height counts the bottom; full at h = 132 in: cone 6 516.561, ellipsoidal 7 168.217 gal (computed, Jones 2002)", () => {
    expect(tankHeight(verticalJones("cone"))).toBeCloseTo(inches(132), 12);
    expect(gallons(tankCapacity(verticalJones("cone")))).toBeCloseTo(6516.561, 3);
    expect(gallons(tankCapacity(verticalJones("ellipsoidal")))).toBeCloseTo(7168.217, 3);
    // A flat bottom ignores bottom_depth_m: the tank is just its shell.
    expect(tankHeight(verticalJones("flat"))).toBeCloseTo(inches(99), 12);
  });
});

describe("rectangular tank", () => {
  it("is length × width × level, in litres as mathjs converts m³", () => {
    const tank: TankGeometry = { shape: "rectangular", length_m: 2, width_m: 1.5, height_m: 1.2 };
    expect(volumeAtLevel(tank, 0.8)).toBeCloseTo((evaluate("2 m * 1.5 m * 0.8 m") as Unit).toNumber("L"), 9);
    expect(tankCapacity(tank)).toBeCloseTo((evaluate("2 m * 1.5 m * 1.2 m") as Unit).toNumber("L"), 9);
    expect(tankHeight(tank)).toBe(1.2);
  });
});

describe("strapping table", () => {
  // Rows from the Machinery's Handbook tank above (published depths and contents), in litres;
  // listed out of order on purpose. The product interpolates linearly between rows (REFERENCES.md §3).
  const table: TankGeometry = {
    shape: "strapping",
    points: [
      { level_m: inches(36), volume_l: 2115 * GALLON_L },
      { level_m: 0, volume_l: 0 },
      { level_m: inches(72), volume_l: 4230 * GALLON_L },
      { level_m: inches(20.625), volume_l: 1000 * GALLON_L },
      { level_m: inches(48.06), volume_l: 3000 * GALLON_L },
    ],
  };

  it("returns the rows themselves and interpolates linearly between them (computed)", () => {
    expect(gallons(volumeAtLevel(table, inches(36)))).toBeCloseTo(2115, 9);
    expect(gallons(volumeAtLevel(table, inches((20.625 + 36) / 2)))).toBeCloseTo((1000 + 2115) / 2, 9);
    expect(gallons(volumeAtLevel(table, inches(36 + (48.06 - 36) / 4)))).toBeCloseTo(2115 + (3000 - 2115) / 4, 9);
  });

  it("clamps outside the table", () => {
    expect(volumeAtLevel(table, -1)).toBe(0);
    expect(gallons(volumeAtLevel(table, inches(100)))).toBeCloseTo(4230, 9);
    expect(tankHeight(table)).toBeCloseTo(inches(72), 12);
    expect(gallons(tankCapacity(table))).toBeCloseTo(4230, 9);
  });

  it("inverts a row and a point between rows", () => {
    expect(levelForVolume(table, 2115 * GALLON_L) / INCH_M).toBeCloseTo(36, 6);
    expect(levelForVolume(table, 1557.5 * GALLON_L) / INCH_M).toBeCloseTo((20.625 + 36) / 2, 6);
  });

  it("treats an empty table as an empty tank", () => {
    const empty: TankGeometry = { shape: "strapping", points: [] };
    expect(tankHeight(empty)).toBe(0);
    expect(volumeAtLevel(empty, 1)).toBe(0);
  });
});

describe("levels outside the tank and the inverse", () => {
  const shapes: Array<[string, TankGeometry]> = [
    ["horizontal flat", HANDBOOK_TANK],
    ["horizontal ellipsoidal", horizontalJones("ellipsoidal", 42)],
    ["horizontal hemispherical", horizontalJones("hemispherical")],
    ["vertical flat", verticalJones("flat")],
    ["vertical cone", verticalJones("cone")],
    ["vertical ellipsoidal", verticalJones("ellipsoidal")],
    ["rectangular", { shape: "rectangular", length_m: 2, width_m: 1.5, height_m: 1.2 }],
  ];

  it.each(shapes)("%s: clamps below the bottom and above the top", (_name, tank) => {
    expect(volumeAtLevel(tank, -0.5)).toBe(0);
    expect(volumeAtLevel(tank, tankHeight(tank) + 1)).toBe(tankCapacity(tank));
    expect(levelForVolume(tank, -10)).toBe(0);
    expect(levelForVolume(tank, tankCapacity(tank) * 2)).toBe(tankHeight(tank));
  });

  it.each(shapes)("%s: levelForVolume undoes volumeAtLevel", (_name, tank) => {
    const height = tankHeight(tank);
    for (const fraction of [0.01, 0.1, 0.25, 0.5, 0.75, 0.9, 0.999]) {
      const level = fraction * height;
      expect(Math.abs(levelForVolume(tank, volumeAtLevel(tank, level)) - level)).toBeLessThan(1e-9);
    }
  });

  it.each(shapes)("%s: volume rises with level", (_name, tank) => {
    const height = tankHeight(tank);
    let previous = -1;
    for (let i = 0; i <= 50; i++) {
      const v = volumeAtLevel(tank, (i / 50) * height);
      expect(v).toBeGreaterThan(previous);
      previous = v;
    }
  });
});
