import { z } from "zod";
import { uuidSchema, text } from "./common";
import { tankCapacity, type TankGeometry } from "../geometry/tank-volume";
import { TANK_PURPOSES } from "../forecast/purpose";

export const ASSET_KINDS = ["tank", "bay", "point"] as const;

const metres = (what: string) => z.number({ message: `${what} is a number of metres.` }).positive(`${what} must be above 0 m.`).max(100, `${what} must be at most 100 m.`);

const verticalCylinder = z
  .object({
    shape: z.literal("vertical_cylinder"),
    diameter_m: metres("Diameter"),
    height_m: metres("Shell height"),
    bottom: z.enum(["flat", "cone", "ellipsoidal"], { message: "Bottom is flat, cone or ellipsoidal." }),
    bottom_depth_m: z.number().min(0, "Bottom depth is 0 m or more.").max(50).default(0),
  })
  .strict()
  .refine((g) => g.bottom === "flat" || g.bottom_depth_m > 0, { message: "A cone or ellipsoidal bottom needs its depth.", path: ["bottom_depth_m"] });

const horizontalCylinder = z
  .object({
    shape: z.literal("horizontal_cylinder"),
    diameter_m: metres("Diameter"),
    length_m: metres("Shell length"),
    heads: z.enum(["flat", "hemispherical", "ellipsoidal"], { message: "Heads are flat, hemispherical or ellipsoidal." }),
    head_depth_m: z.number().positive("Head depth must be above 0 m.").max(50).optional(),
  })
  .strict();

const rectangular = z
  .object({ shape: z.literal("rectangular"), length_m: metres("Length"), width_m: metres("Width"), height_m: metres("Height") })
  .strict();

const strapping = z
  .object({
    shape: z.literal("strapping"),
    points: z
      .array(z.object({ level_m: z.number().min(0, "Levels start at 0 m."), volume_l: z.number().min(0, "Volumes are 0 L or more.") }).strict())
      .min(2, "A strapping table needs at least two rows.")
      .max(5000, "A strapping table has at most 5000 rows."),
  })
  .strict()
  .refine(
    (g) => {
      const sorted = [...g.points].sort((a, b) => a.level_m - b.level_m);
      return sorted.every((p, i) => i === 0 || (p.level_m > sorted[i - 1].level_m && p.volume_l >= sorted[i - 1].volume_l));
    },
    { message: "Each level appears once, and volume never falls as the level rises.", path: ["points"] },
  );

export const geometrySchema: z.ZodType<TankGeometry> = z.discriminatedUnion("shape", [verticalCylinder, horizontalCylinder, rectangular, strapping], {
  message: "Shape is vertical_cylinder, horizontal_cylinder, rectangular or strapping.",
}) as z.ZodType<TankGeometry>;

const pct = (what: string) => z.number().min(0, `${what} is 0–100 %.`).max(100, `${what} is 0–100 %.`);

const assetFields = {
  site_id: uuidSchema,
  kind: z.enum(ASSET_KINDS, { message: "Kind is tank, bay or point." }),
  name: text().trim().min(1, "Give the asset a name.").max(120, "Keep the name under 120 characters."),
  mount_height_m: metres("Mount height").nullable().optional(),
  purpose: z.enum(TANK_PURPOSES, { message: `Purpose is one of ${TANK_PURPOSES.join(", ")}.` }).nullable().optional(),
  // Given only with a strapping table, whose last row need not be the brim; other shapes derive it.
  capacity_l: z.number({ message: "Capacity is a number of litres." }).positive("Capacity must be above 0 L.").max(1e9, "Capacity must be at most 1 000 000 000 L.").nullable().optional(),
  safe_fill_pct: pct("Safe fill").nullable().optional(),
  reorder_pct: pct("Reorder level").nullable().optional(),
  floor_distance_m: metres("Floor distance").nullable().optional(),
  occupied_below_m: metres("Occupied-below distance").nullable().optional(),
  geometry: geometrySchema.nullable().optional(),
  bay_row: z.number().int().min(0).max(500).nullable().optional(),
  bay_col: z.number().int().min(0).max(500).nullable().optional(),
  bay_level: text().trim().max(60).nullable().optional(),
};

type AssetShape = { kind?: string; purpose?: string | null; capacity_l?: number | null; mount_height_m?: number | null; geometry?: unknown; floor_distance_m?: number | null; occupied_below_m?: number | null; safe_fill_pct?: number | null; reorder_pct?: number | null };

/**
 * A capacity is given only with a strapping table (the other shapes derive theirs), and it is at least the
 * table's largest volume: the table may stop below the brim, never above it.
 */
function capacityIssues(geometry: TankGeometry | null | undefined, capacityL: number | null | undefined): { path: string; message: string }[] {
  if (capacityL == null || geometry == null) return [];
  if (geometry.shape !== "strapping") return [{ path: "capacity_l", message: "Capacity follows from the shape; give it only with a strapping table." }];
  const tableMaxL = tankCapacity(geometry);
  return capacityL < tableMaxL ? [{ path: "capacity_l", message: `Capacity must be at least the table's largest volume, ${tableMaxL} L.` }] : [];
}

/** The capacity to store: a strapping table's stated one (else its largest volume); the shape's for the others, to 0.1 L. */
export function capacityToStore(a: { kind: string; geometry?: TankGeometry | null; capacity_l?: number | null }): number | null {
  if (a.kind !== "tank" || a.geometry == null) return null;
  if (a.geometry.shape === "strapping" && a.capacity_l != null) return a.capacity_l;
  return Math.round(tankCapacity(a.geometry) * 10) / 10;
}

/** Rules that tie fields together; applied to the merged record on PATCH too. */
export function assetConsistencyIssues(a: AssetShape): { path: string; message: string }[] {
  const issues: { path: string; message: string }[] = [];
  if (a.kind === "tank") {
    if (a.geometry == null) issues.push({ path: "geometry", message: "A tank needs its geometry (shape and dimensions, or a strapping table)." });
    if (a.mount_height_m == null) issues.push({ path: "mount_height_m", message: "A tank needs the sensor face height above the tank bottom." });
    if (a.safe_fill_pct != null && a.reorder_pct != null && a.reorder_pct >= a.safe_fill_pct) {
      issues.push({ path: "reorder_pct", message: "The reorder level must be below the safe fill." });
    }
    issues.push(...capacityIssues(a.geometry as TankGeometry | null | undefined, a.capacity_l));
  } else {
    if (a.purpose != null) issues.push({ path: "purpose", message: "Only a tank has a purpose." });
    if (a.capacity_l != null) issues.push({ path: "capacity_l", message: "Only a tank has a capacity." });
  }
  if (a.kind === "bay") {
    if (a.floor_distance_m == null) issues.push({ path: "floor_distance_m", message: "A bay needs the distance from the sensor to the empty floor." });
    if (a.occupied_below_m == null) issues.push({ path: "occupied_below_m", message: "A bay needs the distance below which it counts as occupied." });
    if (a.floor_distance_m != null && a.occupied_below_m != null && a.occupied_below_m >= a.floor_distance_m) {
      issues.push({ path: "occupied_below_m", message: "Occupied-below must be nearer than the floor distance." });
    }
  }
  return issues;
}

export const createAssetSchema = z
  .object(assetFields)
  .strict()
  .superRefine((a, ctx) => {
    for (const issue of assetConsistencyIssues(a)) ctx.addIssue({ code: "custom", path: [issue.path], message: issue.message });
  });
export const updateAssetSchema = z.object(assetFields).omit({ kind: true, site_id: true }).partial().strict();
export type AssetInput = z.infer<typeof createAssetSchema>;
export type AssetPatch = z.infer<typeof updateAssetSchema>;

/** The asset list's filters, in the API's query string and in the screen's URL. */
export const assetListQuerySchema = z.object({ site_id: uuidSchema.optional(), kind: z.enum(ASSET_KINDS).optional() });
