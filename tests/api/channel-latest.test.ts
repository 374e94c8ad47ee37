import { beforeAll, describe, expect, it } from "vitest";
import { signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";
import { runWorkerOnce } from "../support/worker";
import { sendReadings } from "./worker-support";

// channel_latest (db/migrations/0018): the newest valid measurement of each channel, kept by the worker
// for the live screens. After every worker run it must equal what the measurements table says is the
// channel's newest measurement with status ok (by time, then reading id) — also when an older reading
// arrives late, and after a recompute rebuilt the channel's measurements.
//
// The test tank of tests/support/fleet.ts: sensor face 3 m above the bottom. REFERENCES.md §2: an echo
// of 5 831 µs at 20 °C is 1.000 m and one of 11 662 µs is 2.000 m (to the centimetre), so levels of 2.00 m and 1.00 m.

const T0 = Date.now() - 60 * 60_000;
const at = (minute: number) => new Date(T0 + minute * 60_000).toISOString();

let admin: Agent;
let tank: Awaited<ReturnType<typeof createTankWithDevice>>;
let channelId: string;

interface LatestRow {
  reading_id: string;
  at: Date;
  level_m: number | null;
  distance_m: number | null;
  volume_l: number | null;
  fill_pct: number | null;
  uncertainty_m: number | null;
  occupied: boolean | null;
}

const COLUMNS = "reading_id, at, level_m, distance_m, volume_l, fill_pct, uncertainty_m, occupied";

async function latestRow(): Promise<LatestRow | undefined> {
  return (await sql<LatestRow>(`SELECT ${COLUMNS} FROM channel_latest WHERE channel_id = $1`, [channelId]))[0];
}

/** The channel's newest valid measurement, as the measurements table itself answers. */
async function newestValidMeasurement(): Promise<LatestRow | undefined> {
  return (await sql<LatestRow>(`SELECT ${COLUMNS} FROM measurements WHERE channel_id = $1 AND status = 'ok' ORDER BY at DESC, reading_id DESC LIMIT 1`, [channelId]))[0];
}

async function expectLatestIsNewestMeasurement() {
  const newest = await newestValidMeasurement();
  expect(newest).toBeDefined();
  expect(await latestRow()).toEqual(newest);
}

/** The asset's latest value as the asset screen's state shows it. */
async function screenLatest() {
  const res = await admin.get(`/api/assets/${tank.tank.id}/overview`);
  expect(res.status).toBe(200);
  return res.body.state.latest as { at: string; level_m: number } | null;
}

beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
  tank = await createTankWithDevice(admin, { device: { expected_interval_s: 3600 } });
  channelId = tank.device.channels[0].id;
}, 120_000);

describe("the latest value of a channel", () => {
  it("is the newest valid measurement after the worker runs; a newer invalid reading leaves it", async () => {
    await sendReadings(tank.apiKey, [
      { seq: 1, at: at(0), channel: 0, echo_us: 11662, air_temp_c: 20 },
      { seq: 2, at: at(10), channel: 0, echo_us: 5831, air_temp_c: 20 },
      // No echo within range (37 000 µs is the sensor's time-out): stored, but not a valid value.
      { seq: 3, at: at(20), channel: 0, echo_us: 37000, air_temp_c: 20 },
    ]);
    await runWorkerOnce();
    await expectLatestIsNewestMeasurement();
    const latest = await latestRow();
    expect(latest?.at.toISOString()).toBe(at(10));
    expect(latest?.level_m).toBeCloseTo(2.0, 2);
    const shown = await screenLatest();
    expect(shown?.at).toBe(at(10));
    expect(shown?.level_m).toBeCloseTo(2.0, 2);
  }, 240_000);

  it("is not replaced by an older reading that arrives late", async () => {
    await sendReadings(tank.apiKey, [{ seq: 4, at: at(5), channel: 0, echo_us: 11662, air_temp_c: 20 }]);
    await runWorkerOnce();
    // The late reading was measured...
    expect(await sql(`SELECT 1 FROM measurements WHERE channel_id = $1 AND at = $2 AND status = 'ok'`, [channelId, at(5)])).toHaveLength(1);
    // ...and the latest value is still the one of minute 10.
    await expectLatestIsNewestMeasurement();
    expect((await latestRow())?.at.toISOString()).toBe(at(10));
    expect((await screenLatest())?.level_m).toBeCloseTo(2.0, 2);
  }, 240_000);

  it("moves on with a newer valid reading", async () => {
    await sendReadings(tank.apiKey, [{ seq: 5, at: at(30), channel: 0, echo_us: 11662, air_temp_c: 20 }]);
    await runWorkerOnce();
    await expectLatestIsNewestMeasurement();
    expect((await latestRow())?.at.toISOString()).toBe(at(30));
    expect((await screenLatest())?.level_m).toBeCloseTo(1.0, 2);
  }, 240_000);

  it("follows a recompute of the channel", async () => {
    // Mounted 10 cm higher: every level 10 cm more once the worker has rebuilt the channel.
    expect((await admin.patch(`/api/assets/${tank.tank.id}`).send({ mount_height_m: 3.1 })).status).toBe(200);
    await runWorkerOnce();
    // Which reading is newest valid after the rebuild is the worker's call (a replay in one batch may judge
    // a jump a spike); the latest value must be that measurement, with the new mounting.
    await expectLatestIsNewestMeasurement();
    const latest = await latestRow();
    expect(latest?.level_m).toBeCloseTo(3.1 - (latest?.distance_m as number), 9);
  }, 240_000);
});
