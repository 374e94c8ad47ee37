import { describe, it, expect } from "vitest";
import { capacityToStore, createAssetSchema, updateAssetSchema } from "@/lib/validations/asset";
import { channelSchema } from "@/lib/validations/device";

const site_id = "6f1c2a4e-2f7b-4d8a-9a51-0c2b8e1d3f47";
const strapping = { shape: "strapping" as const, points: [{ level_m: 0, volume_l: 0 }, { level_m: 1, volume_l: 1000 }, { level_m: 2, volume_l: 2600 }] };

describe("asset schema: purpose and a strapping table's capacity", () => {
  it("accepts capacity_l with a strapping table, above its last row (PRODUCT.md: capacity derived from the shape unless strapping)", () => {
    const a = createAssetSchema.parse({ site_id, kind: "tank", name: "Backwash recovery", mount_height_m: 2.4, geometry: strapping, capacity_l: 2800, purpose: "process" });
    expect(a).toMatchObject({ capacity_l: 2800, purpose: "process" });
    expect(capacityToStore(a)).toBe(2800);
    // Without one, the table's largest volume.
    expect(capacityToStore({ kind: "tank", geometry: strapping })).toBe(2600);
  });

  it("refuses a capacity below the table's last row, or with a shape that derives its own", () => {
    const low = createAssetSchema.safeParse({ site_id, kind: "tank", name: "T", mount_height_m: 2.4, geometry: strapping, capacity_l: 2000 });
    expect(low.success).toBe(false);
    expect(low.error?.issues[0]).toMatchObject({ path: ["capacity_l"], message: expect.stringMatching(/2600 L/) });
    const box = { shape: "rectangular" as const, length_m: 2, width_m: 1, height_m: 1.5 };
    expect(createAssetSchema.safeParse({ site_id, kind: "tank", name: "T", mount_height_m: 1.6, geometry: box, capacity_l: 3000 }).success).toBe(false);
    // 2 × 1 × 1.5 m = 3 m³ = 3000 L (computed).
    expect(capacityToStore({ kind: "tank", geometry: box })).toBe(3000);
  });

  it("knows the four purposes and gives one only to tanks", () => {
    for (const purpose of ["supply", "process", "sump", "reserve"]) expect(updateAssetSchema.safeParse({ purpose }).success).toBe(true);
    expect(updateAssetSchema.safeParse({ purpose: "decorative" }).success).toBe(false);
    const bay = createAssetSchema.safeParse({ site_id, kind: "bay", name: "B1", floor_distance_m: 2, occupied_below_m: 1.2, purpose: "supply" });
    expect(bay.error?.issues[0].path).toEqual(["purpose"]);
  });
});

describe("channel schema: the transducer's stated accuracy", () => {
  it("accepts a positive half-width in metres, or null for the trade default", () => {
    expect(channelSchema.parse({ index: 0, stated_accuracy_m: 0.005 }).stated_accuracy_m).toBe(0.005);
    expect(channelSchema.parse({ index: 0, stated_accuracy_m: null }).stated_accuracy_m).toBeNull();
    expect(channelSchema.safeParse({ index: 0, stated_accuracy_m: 0 }).success).toBe(false);
  });
});
