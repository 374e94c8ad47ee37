import { beforeAll, describe, expect, it } from "vitest";
import { signedIn, signInAgent, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { createOtherOrganisation } from "../support/db";
import { runWorkerOnce } from "../support/worker";
import { sendEchoReadings } from "./calibration-readings";

// Issue 15 §1: the asset page shows what the "±" of a distance is made of. One reading 1.000 m from the
// face at 20 °C, its air temperature from the reading's own sensor, the transducer at the trade default.
let viewer: Agent;
let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;

beforeAll(async () => {
  const admin = await signedIn("admin@halftrip.test");
  viewer = await signedIn("viewer@halftrip.test");
  fleet = await createTankWithDevice(admin);
  await sendEchoReadings(fleet.apiKey, [{ at: new Date(Date.now() - 60_000), distanceM: 1.0 }], 20);
  await runWorkerOnce();
});

describe("uncertainty budget", () => {
  it("matches a budget worked by hand after the GUM (JCGM 100:2008)", async () => {
    const res = await viewer.get(`/api/assets/${fleet.tank.id}/uncertainty`);
    expect(res.status).toBe(200);
    const { measurement, budget } = res.body;
    expect(measurement.temp_source).toBe("reading");
    // The echo time is sent to 0.1 µs: the raw distance is 1.000 m to within 0.02 mm.
    expect(measurement.raw_distance_m).toBeCloseTo(1.0, 4);
    const part = (name: string) => budget.components.find((c: { part: string }) => c.part === name);

    // Worked by hand (GUM JCGM 100:2008; the figures computed from its formulas):
    // - transducer: ±3 mm stated (the trade default, from memory), rectangular, u = a/√3 (§4.3.7) = 1.7321 mm;
    // - air temperature: u(T) = 0.5 K for a reading's own sensor (the product's setting, PIPELINE_SETTINGS);
    //   c ∝ √T, so ∂d/∂T = d/(2·T) = 1.000 m / (2 × 293.15 K) = 1.7056 mm/K, contribution 0.5 × 1.7056 = 0.8528 mm;
    // - echo sensor without a timer tick, single echo, never calibrated: no timer, burst or calibration part;
    // - u_c = √(1.7321² + 0.8528²) = √(3.0000 + 0.7273) = 1.9306 mm (§5.1.2, independent inputs);
    // - U = k·u_c with k = 2 (§6.2) = 3.8612 mm; the transducer's share 3.0000 / 3.7273 = 80.5 %.
    expect(budget.components.map((c: { part: string }) => c.part).sort()).toEqual(["air_temperature", "transducer"]);
    expect(part("transducer")).toMatchObject({ type: "B", unit: "m", is_default: true, source: expect.stringMatching(/trade default/) });
    expect(part("transducer").contribution_m).toBeCloseTo(1.7321e-3, 7);
    expect(part("air_temperature")).toMatchObject({ type: "B", unit: "K", standard_uncertainty: 0.5, source: expect.stringMatching(/own air sensor/) });
    expect(part("air_temperature").sensitivity_m_per_unit).toBeCloseTo(1.7056e-3, 6);
    expect(part("air_temperature").contribution_m).toBeCloseTo(0.8528e-3, 6);
    expect(budget.combined_m).toBeCloseTo(1.9306e-3, 6);
    expect(budget.coverage_factor).toBe(2);
    expect(budget.expanded_m).toBeCloseTo(3.8612e-3, 6);
    expect(part("transducer").variance_share).toBeCloseTo(0.805, 3);
    expect(budget.reference).toBe("GUM, JCGM 100:2008");
    // The worker stored the same combined uncertainty with the measurement.
    expect(measurement.stored_uncertainty_m).toBeCloseTo(budget.combined_m, 9);
  });

  it("answers 404 for another organisation's asset", async () => {
    const other = await createOtherOrganisation();
    const { agent } = await signInAgent(other.adminEmail, other.password);
    expect((await agent.get(`/api/assets/${fleet.tank.id}/uncertainty`)).status).toBe(404);
  });
});
