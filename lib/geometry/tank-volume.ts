// Liquid volume in a tank at a given level, and the inverse. Lengths in metres, volumes in litres;
// levels count from the lowest point inside the tank. Partial-volume formulas for dished heads and
// bottoms follow Jones, "Calculating Tank Volume", Chemical Processing, Nov 2002.

export type VerticalBottom = "flat" | "cone" | "ellipsoidal";
export type HorizontalHeads = "flat" | "hemispherical" | "ellipsoidal";

export interface VerticalCylinderGeometry {
  shape: "vertical_cylinder";
  diameter_m: number;
  /** Straight shell above the bottom. */
  height_m: number;
  bottom: VerticalBottom;
  /** How far a cone or ellipsoidal bottom reaches below the shell; ignored for a flat bottom. */
  bottom_depth_m: number;
}

export interface HorizontalCylinderGeometry {
  shape: "horizontal_cylinder";
  diameter_m: number;
  /** Straight shell, heads excluded. */
  length_m: number;
  heads: HorizontalHeads;
  /** Depth of each ellipsoidal head; defaults to D/4 (a 2:1 head). Flat heads have none, hemispherical ones D/2. */
  head_depth_m?: number;
}

export interface RectangularGeometry {
  shape: "rectangular";
  length_m: number;
  width_m: number;
  height_m: number;
}

export interface StrappingPoint {
  level_m: number;
  volume_l: number;
}

export interface StrappingGeometry {
  shape: "strapping";
  points: StrappingPoint[];
}

export type TankGeometry = VerticalCylinderGeometry | HorizontalCylinderGeometry | RectangularGeometry | StrappingGeometry;

const LITRES_PER_M3 = 1000;

function clamp(value: number, lo: number, hi: number): number {
  return Math.min(Math.max(value, lo), hi);
}

function bottomDepth(g: VerticalCylinderGeometry): number {
  return g.bottom === "flat" ? 0 : g.bottom_depth_m;
}

function headDepth(g: HorizontalCylinderGeometry): number {
  if (g.heads === "flat") return 0;
  if (g.heads === "hemispherical") return g.diameter_m / 2;
  return g.head_depth_m ?? g.diameter_m / 4;
}

/** Area of a circular segment of depth h in a circle of radius r. */
function circularSegmentArea(r: number, h: number): number {
  const w = r - h;
  return r * r * Math.acos(clamp(w / r, -1, 1)) - w * Math.sqrt(Math.max(0, 2 * r * h - h * h));
}

/** Vertical cylinder with a convex bottom, m³; h from the lowest point (Jones 2002). */
function verticalCylinderVolume(g: VerticalCylinderGeometry, h: number): number {
  const d = g.diameter_m;
  const a = bottomDepth(g);
  const shellArea = (Math.PI * d * d) / 4;
  if (a <= 0) return shellArea * h;
  if (g.bottom === "cone") {
    // Below the rim the cross-section grows linearly with height; above it, the cone holds a/3 of its bounding cylinder.
    return h < a ? shellArea * (h / a) ** 2 * (h / 3) : shellArea * (h - (2 * a) / 3);
  }
  // Half-ellipsoid bottom of depth a: it holds 2a/3 of its bounding cylinder.
  return h < a ? shellArea * (h / a) ** 2 * (a - h / 3) : shellArea * (h - a / 3);
}

/** Horizontal cylinder with two equal heads, m³ (Jones 2002). */
function horizontalCylinderVolume(g: HorizontalCylinderGeometry, h: number): number {
  const r = g.diameter_m / 2;
  const a = headDepth(g);
  const shell = circularSegmentArea(r, h) * g.length_m;
  // Both heads together: an ellipsoid with semi-axes a, R, R cut at depth h; a hemisphere is a = R.
  const heads = Math.PI * a * h * h * (1 - h / (3 * r));
  return shell + heads;
}

function sortedPoints(g: StrappingGeometry): StrappingPoint[] {
  return [...g.points].sort((p, q) => p.level_m - q.level_m);
}

function strappingVolume(g: StrappingGeometry, level: number): number {
  const points = sortedPoints(g);
  if (points.length === 0) return 0;
  if (level <= points[0].level_m) return points[0].volume_l;
  for (let i = 1; i < points.length; i++) {
    const lo = points[i - 1];
    const hi = points[i];
    if (level <= hi.level_m) {
      const span = hi.level_m - lo.level_m;
      if (span <= 0) return hi.volume_l;
      return lo.volume_l + ((level - lo.level_m) / span) * (hi.volume_l - lo.volume_l);
    }
  }
  return points[points.length - 1].volume_l;
}

/** Total internal height, m: the highest level the tank can hold. */
export function tankHeight(geometry: TankGeometry): number {
  switch (geometry.shape) {
    case "vertical_cylinder":
      return geometry.height_m + bottomDepth(geometry);
    case "horizontal_cylinder":
      return geometry.diameter_m;
    case "rectangular":
      return geometry.height_m;
    case "strapping":
      return geometry.points.reduce((max, p) => Math.max(max, p.level_m), 0);
  }
}

/** Liquid volume, litres, at a level (m) measured from the lowest point; levels outside the tank are clamped. */
export function volumeAtLevel(geometry: TankGeometry, levelM: number): number {
  const level = clamp(levelM, 0, tankHeight(geometry));
  switch (geometry.shape) {
    case "vertical_cylinder":
      return verticalCylinderVolume(geometry, level) * LITRES_PER_M3;
    case "horizontal_cylinder":
      return horizontalCylinderVolume(geometry, level) * LITRES_PER_M3;
    case "rectangular":
      return geometry.length_m * geometry.width_m * level * LITRES_PER_M3;
    case "strapping":
      return strappingVolume(geometry, level);
  }
}

/** Volume, litres, of the tank filled to its total internal height. */
export function tankCapacity(geometry: TankGeometry): number {
  return volumeAtLevel(geometry, tankHeight(geometry));
}

const BISECTION_STEPS = 100;

/**
 * Lowest level (m) at which the tank holds the given volume (litres), by bisection on volumeAtLevel,
 * which rises with level for every shape. Volumes outside 0…capacity give the bottom or the top.
 */
export function levelForVolume(geometry: TankGeometry, litres: number): number {
  const height = tankHeight(geometry);
  if (Number.isNaN(litres)) return Number.NaN;
  if (litres <= volumeAtLevel(geometry, 0)) return 0;
  if (litres > tankCapacity(geometry)) return height;
  let lo = 0;
  let hi = height;
  for (let i = 0; i < BISECTION_STEPS && hi - lo > 0; i++) {
    const mid = (lo + hi) / 2;
    if (mid <= lo || mid >= hi) break;
    if (volumeAtLevel(geometry, mid) < litres) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}
