import SwaggerParser from "@apidevtools/swagger-parser";
import Ajv from "ajv";
import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { openApi30ToJsonSchema } from "../support/openapi";

// The OpenAPI document is checked by an independent validator (@apidevtools/swagger-parser), and its
// Reading schema (ajv) must agree with what the route accepts and rejects.
let doc: Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any -- a JSON document read field by field
beforeAll(async () => {
  doc = (await anonymous().get("/api/v1/openapi.json").expect(200)).body;
});

describe("GET /api/v1/openapi.json", () => {
  it("is a valid OpenAPI 3 document", async () => {
    await expect(SwaggerParser.validate(structuredClone(doc) as never)).resolves.toBeTruthy();
    expect(doc.openapi).toMatch(/^3\./);
  });

  it("says that the APIs speak SI whatever units people read (issue 15)", () => {
    expect(doc.info.description).toMatch(/every quantity this API \(and the management API\) takes or answers is SI/);
    expect(doc.info.description).toMatch(/metres \(_m\).*litres \(_l\).*degrees Celsius \(_c\)/);
  });

  it("documents the route and every status code it answers", () => {
    const op = doc.paths["/api/v1/readings"].post;
    expect(Object.keys(op.responses).sort()).toEqual(["202", "400", "401", "413", "415", "429", "503"]);
    expect(op.responses["429"].headers["Retry-After"]).toBeDefined();
  });

  it("has a Reading schema that agrees with the route", async () => {
    const ajv = new Ajv({ strict: false });
    ajv.addFormat("date-time", true);
    const schema = openApi30ToJsonSchema(doc.components.schemas.Reading) as Record<string, unknown>;
    const validate = ajv.compile(schema);
    const admin = await signedIn("admin@halftrip.test");
    const { apiKey } = await createTankWithDevice(admin);
    const samples = [
      { seq: 1, channel: 0, echo_us: 5831.5, air_temp_c: 11.5 },
      { seq: 2, channel: 0, samples_us: [5830, 5832] },
      { seq: "3", channel: 0, echo_us: 5831 },
      { seq: 4, channel: 0, echo_us: 5831, extra: true },
      { seq: 5, channel: 9, echo_us: 5831 },
      { seq: 6, channel: 0, echo_us: -1 },
    ];
    const res = await anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${apiKey}`).set("Content-Type", "application/json").send({ readings: samples });
    const rejected = new Set(res.body.rejected.map((r: { index: number }) => r.index));
    samples.forEach((s, i) => expect(validate(s), `sample ${i}`).toBe(!rejected.has(i)));
  });
});
