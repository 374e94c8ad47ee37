import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";
import { drainQueue, type BatchHook } from "@/lib/worker/batch";
import { getSequelize } from "@/lib/db/sequelize";
import { echoFor, practicalSpeed, sendReadings } from "./worker-support";

// While batches are in flight, each claim starts after the last reading of the batch before it. A
// reading that arrives late, older than everything in flight, must still be measured by the same
// drain: the drain ends only when a claim from the start of the queue finds nothing either.

const C20 = practicalSpeed(20);
const READINGS = 120;
let admin: Agent;
let tank: Awaited<ReturnType<typeof createTankWithDevice>>;
let start: number;

const reading = (seq: number, at: number, distanceM: number) => ({ seq, at: new Date(at).toISOString(), channel: 0, echo_us: Math.round(echoFor(distanceM, C20) * 10) / 10, air_temp_c: 20 });

beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
  tank = await createTankWithDevice(admin, { device: { expected_interval_s: 3600 } });
  start = Date.now() - (READINGS + 20) * 5_000;
  // Invented: a tank at 1 m, drawn down 0.1 mm a reading.
  await sendReadings(tank.apiKey, Array.from({ length: READINGS }, (_, k) => reading(k + 1, start + (k + 10) * 5_000, 1 + 0.0001 * k)));
}, 120_000);

afterAll(async () => {
  await getSequelize().close();
});

describe("a drain with batches in flight", () => {
  it("measures a reading that arrives late behind them", async () => {
    let sent = false;
    // After the first batch is written, the device sends a reading older than all the others.
    const lateSender: BatchHook = {
      name: "late sender",
      async run() {
        if (sent) return;
        sent = true;
        await sendReadings(tank.apiKey, [reading(READINGS + 1, start, 1)]);
      },
    };
    const result = await drainQueue(20, [lateSender]);
    expect(sent).toBe(true);
    expect(result.drained).toBe(true);
    expect(result.batches).toBeGreaterThan(3);

    const [counts] = await sql<{ measured: string; queued: string; late: string }>(
      `SELECT (SELECT count(*) FROM measurements WHERE device_id = $1) AS measured,
              (SELECT count(*) FROM reading_queue WHERE device_id = $1) AS queued,
              (SELECT count(*) FROM measurements WHERE device_id = $1 AND at = $2) AS late`,
      [tank.device.id, new Date(start).toISOString()],
    );
    expect(counts).toEqual({ measured: String(READINGS + 1), queued: "0", late: "1" });
  }, 120_000);
});
