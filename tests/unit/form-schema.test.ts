import { describe, expect, it } from "vitest";
import { z } from "zod";
import { flatErrors, NOT_A_NUMBER, payloadSchema, quantityIssues } from "@/components/ui/form-schema";
import { unit as mathUnit } from "mathjs";
import { quantityInputFor } from "@/lib/units/quantity-input";
import { numberOrNull } from "@/components/ui/decimal";
import { createSiteSchema } from "@/lib/validations/site";
import { createAssetSchema } from "@/lib/validations/asset";

// A form's text read into the API's payload and checked by the API's own schema (lib/validations).

const siteText = z.object({ name: z.string(), time_zone: z.string(), latitude: z.string() });
const sitePayload = (v: z.infer<typeof siteText>) => ({ name: v.name, time_zone: v.time_zone, latitude: numberOrNull(v.latitude) });
const siteForm = payloadSchema(siteText, sitePayload, createSiteSchema);

describe("payloadSchema", () => {
  it("reads a decimal comma as the decimal separator and hands on the API's parsed payload", () => {
    expect(siteForm.parse({ name: " Quarry ", time_zone: "Europe/Dublin", latitude: "53,35" })).toEqual({ name: "Quarry", time_zone: "Europe/Dublin", latitude: 53.35 });
  });

  it("reports every field's issue at once, on the API's path, and says when a box holds no number", () => {
    const result = siteForm.safeParse({ name: "", time_zone: "Mars/Olympus", latitude: "north" });
    expect(result.success).toBe(false);
    const byPath = Object.fromEntries(result.error!.issues.map((i) => [i.path.join("."), i.message]));
    expect(byPath).toEqual({ name: "Give the site a name.", time_zone: "Use an IANA time zone such as Europe/Dublin.", latitude: NOT_A_NUMBER });
  });

  it("keeps the API's own message for a number out of its range", () => {
    const result = siteForm.safeParse({ name: "Quarry", time_zone: "UTC", latitude: "91" });
    expect(result.error?.issues.map((i) => [i.path.join("."), i.message])).toEqual([["latitude", "Latitude is between -90 and 90."]]);
  });

  it("names nested fields by their path in the payload", () => {
    const text = z.object({ diameter: z.string() });
    const form = payloadSchema(
      text,
      (v) => ({ site_id: "00000000-0000-4000-8000-000000000000", kind: "tank", name: "T", mount_height_m: 2, geometry: { shape: "vertical_cylinder", diameter_m: numberOrNull(v.diameter), height_m: 2, bottom: "flat" } }),
      createAssetSchema,
    );
    const result = form.safeParse({ diameter: "1,2,3" });
    expect(result.error?.issues.map((i) => [i.path.join("."), i.message])).toEqual([["geometry.diameter_m", NOT_A_NUMBER]]);
  });
});

describe("flatErrors", () => {
  it("flattens react-hook-form's nested errors to dotted paths, the form's own under _", () => {
    const ref = { name: "x" };
    const errors = {
      name: { type: "custom", message: "Give the site a name.", ref },
      geometry: { diameter_m: { type: "custom", message: NOT_A_NUMBER, ref } },
      channels: [undefined, { max_range_m: { type: "custom", message: "Maximum range must exceed minimum range." } }],
      points: { root: { type: "custom", message: "A strapping table needs at least two rows." } },
      root: { type: "server", message: "The server answered 500." },
    };
    expect(flatErrors(errors as never)).toEqual({
      name: "Give the site a name.",
      "geometry.diameter_m": NOT_A_NUMBER,
      "channels.1.max_range_m": "Maximum range must exceed minimum range.",
      points: "A strapping table needs at least two rows.",
      _: "The server answered 500.",
    });
  });
});

describe("quantityIssues", () => {
  // A form in US units: one length box read into metres, checked by a schema that wants a positive length.
  const qi = quantityInputFor({ unit_system: "us", decimal_separator: ".", clock: "12h" });
  const text = z.object({ height: z.string() });
  const toPayload = (v: z.infer<typeof text>) => ({ height_m: qi.read(v.height, "length") });
  const form = payloadSchema(text, toPayload, z.object({ height_m: z.number().positive().nullable() }), (v, payload) => quantityIssues(qi, payload, { height_m: v.height }));

  it("lets a length typed in feet and inches through, in metres", () => {
    // 8 ft 3.5 in in metres by mathjs, not by the code under test.
    expect(form.parse({ height: "8 ft 3.5 in" }).height_m).toBeCloseTo(mathUnit(8, "ft").toNumber("m") + mathUnit(3.5, "inch").toNumber("m"), 12);
  });

  it("says why a box holds no length ahead of the schema's 'not a number'", () => {
    const issues = form.safeParse({ height: "tall" }).error!.issues.filter((i) => i.path.join(".") === "height_m").map((i) => i.message);
    expect(issues[0]).not.toBe(NOT_A_NUMBER);
    expect(issues[0]).toMatch(/number/);
    expect(issues).toContain(NOT_A_NUMBER);
  });

  it("says nothing of a box that reads, nor of an empty one", () => {
    expect(quantityIssues(qi, { a: 2.5, b: null }, { a: "8 ft 2.4 in", b: "" })).toEqual([]);
  });
});
