import { describe, it, expect } from "vitest";
import { measurementsQuerySchema, resolvePeriod, seriesQuerySchema } from "@/lib/validations/measurement";

describe("measurement and series queries", () => {
  it("takes defaults and coerces numbers", () => {
    expect(measurementsQuerySchema.parse({})).toEqual({ limit: 1000, order: "desc" });
    expect(measurementsQuerySchema.parse({ limit: "25", order: "asc" })).toEqual({ limit: 25, order: "asc" });
    expect(seriesQuerySchema.parse({}).bucket).toBe("1h");
  });

  it("refuses from after to, limits out of range, unknown buckets and over-long periods", () => {
    const bad = [
      measurementsQuerySchema.safeParse({ from: "2026-03-02T00:00:00Z", to: "2026-03-01T00:00:00Z" }),
      measurementsQuerySchema.safeParse({ limit: "0" }),
      measurementsQuerySchema.safeParse({ limit: "10001" }),
      measurementsQuerySchema.safeParse({ limit: "2.5" }),
      measurementsQuerySchema.safeParse({ from: "last week" }),
      seriesQuerySchema.safeParse({ bucket: "1d" }),
      seriesQuerySchema.safeParse({ bucket: "5m", from: "2026-01-01T00:00:00Z", to: "2026-02-15T00:00:00Z" }),
    ];
    for (const r of bad) expect(r.success).toBe(false);
    expect(seriesQuerySchema.safeParse({ bucket: "1h", from: "2026-01-01T00:00:00Z", to: "2026-02-15T00:00:00Z" }).success).toBe(true);
  });

  it("fills the period from now backwards", () => {
    const now = new Date("2026-03-14T06:30:00Z");
    expect(resolvePeriod({}, 7, now)).toEqual({ from: new Date("2026-03-07T06:30:00Z"), to: now });
    const from = new Date("2026-03-14T00:00:00Z");
    expect(resolvePeriod({ from }, 7, now)).toEqual({ from, to: now });
  });
});
