import { beforeAll, describe, expect, it } from "vitest";
import { signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";
import { runWorkerOnce, startWorkerOnce } from "../support/worker";
import { echoFor, practicalSpeed, sendReadings } from "./worker-support";

// Two workers started at once on one backlog: every reading gets exactly one measurement, and the
// channel's history comes out exactly as one worker going through it in a single pass would make it
// (a recompute), so the per-channel state handed from batch to batch and worker to worker is exact.

const READINGS = 3000;
const C20 = practicalSpeed(20);

let admin: Agent;
let tank: Awaited<ReturnType<typeof createTankWithDevice>>;

const snapshotMeasurements = (channelId: string) =>
  sql(
    `SELECT reading_id, at, status, status_detail, tof_us, air_temp_c, temp_source, speed_of_sound_ms, raw_distance_m, distance_m,
            level_m, volume_l, fill_pct, ullage_l, occupied, uncertainty_m
     FROM measurements WHERE channel_id = $1 ORDER BY reading_id`,
    [channelId],
  );
const snapshotRollups = (assetId: string) =>
  sql(
    `SELECT bucket_s, bucket_start, n_all, n, distance_sum, distance_min, distance_max, level_sum, volume_sum, occupied_n
     FROM measurement_rollups WHERE asset_id = $1 ORDER BY bucket_s, bucket_start`,
    [assetId],
  );
const snapshotFlags = (channelId: string) =>
  sql(`SELECT flag, since, cleared_at, magnitude FROM health_flags WHERE channel_id = $1 ORDER BY flag, since`, [channelId]);

beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
  // Reporting every 5 s against an expected hour, so no silence can count as offline between the runs.
  tank = await createTankWithDevice(admin, { device: { expected_interval_s: 3600 } });
  const start = Date.now() - (READINGS + 12) * 5_000;
  // A tank drawn down 0.1 mm every 5 s with a little jitter and, every 400th reading, a 20 cm spike.
  const readings = Array.from({ length: READINGS }, (_, k) => {
    const distance = 1 + 0.0001 * k + [0.0004, -0.0003, 0.0001][k % 3] + (k % 400 === 399 ? 0.2 : 0);
    return { seq: k + 1, at: new Date(start + k * 5_000).toISOString(), channel: 0, echo_us: Math.round(echoFor(distance, C20) * 10) / 10, air_temp_c: 20 };
  });
  await sendReadings(tank.apiKey, readings);
}, 240_000);

describe("two workers on one backlog", () => {
  it("measure each reading exactly once", async () => {
    await Promise.all([0, 1].map(() => runWorkerOnce({ WORKER_BATCH_SIZE: "150" })));

    const [counts] = await sql<{ measurements: string; distinct_readings: string; readings: string; queued: string }>(
      `SELECT (SELECT count(*) FROM measurements m WHERE m.device_id = $1) AS measurements,
              (SELECT count(DISTINCT reading_id) FROM measurements m WHERE m.device_id = $1) AS distinct_readings,
              (SELECT count(*) FROM readings r WHERE r.device_id = $1 AND EXISTS (SELECT 1 FROM measurements m WHERE m.reading_id = r.id AND m.at = r.at)) AS readings,
              (SELECT count(*) FROM reading_queue q JOIN readings r ON r.id = q.reading_id WHERE r.device_id = $1) AS queued`,
      [tank.device.id],
    );
    expect(counts).toEqual({ measurements: String(READINGS), distinct_readings: String(READINGS), readings: String(READINGS), queued: "0" });
    const [rolled] = await sql<{ n: string }>(`SELECT sum(n_all) AS n FROM measurement_rollups WHERE asset_id = $1 AND bucket_s = 300`, [tank.tank.id]);
    expect(Number(rolled.n)).toBe(READINGS);
    // Each spike stands out against its neighbours and is marked, the rest is not.
    const [suspects] = await sql<{ n: string }>(`SELECT count(*) AS n FROM measurements WHERE device_id = $1 AND status = 'suspect'`, [tank.device.id]);
    expect(Number(suspects.n)).toBe(Math.floor(READINGS / 400));
  }, 240_000);

  it("leave the same history as a single pass over it", async () => {
    const channelId = tank.device.channels[0].id;
    const streamed = { measurements: await snapshotMeasurements(channelId), rollups: await snapshotRollups(tank.tank.id), flags: await snapshotFlags(channelId) };
    // A recompute rebuilds the channel in one pass, from a fresh state.
    expect((await admin.patch(`/api/assets/${tank.tank.id}`).send({ mount_height_m: 3 })).status).toBe(200);
    await runWorkerOnce({ WORKER_QUIET: "1" });
    const [request] = await sql(`SELECT done_at, channels_done, measurements, error FROM recompute_requests WHERE asset_id = $1 ORDER BY id DESC LIMIT 1`, [tank.tank.id]);
    expect(request).toMatchObject({ channels_done: 1, measurements: READINGS, error: null });
    expect(request.done_at).not.toBeNull();

    expect(await snapshotMeasurements(channelId)).toEqual(streamed.measurements);
    expect(await snapshotFlags(channelId)).toEqual(streamed.flags);
    const rollups = await snapshotRollups(tank.tank.id);
    expect(rollups.map((r) => [r.bucket_s, r.bucket_start, r.n_all, r.n, r.distance_min, r.distance_max, r.occupied_n])).toEqual(
      streamed.rollups.map((r) => [r.bucket_s, r.bucket_start, r.n_all, r.n, r.distance_min, r.distance_max, r.occupied_n]),
    );
    // Sums added batch by batch differ from one sum only by rounding.
    rollups.forEach((r, i) => {
      for (const key of ["distance_sum", "level_sum", "volume_sum"]) {
        expect(Math.abs(r[key] - streamed.rollups[i][key])).toBeLessThanOrEqual(1e-9 * Math.abs(r[key]));
      }
    });
  }, 240_000);

  it("lose and duplicate nothing when one is killed mid-batch", async () => {
    const other = await createTankWithDevice(admin, { device: { expected_interval_s: 3600 } });
    const start = Date.now() - 2000 * 5_000;
    await sendReadings(
      other.apiKey,
      Array.from({ length: 2000 }, (_, k) => ({ seq: k + 1, at: new Date(start + k * 5_000).toISOString(), channel: 0, echo_us: 5831 + (k % 7), air_temp_c: 20 })),
    );
    // Small batches and a kill (no chance to clean up) as soon as it has committed some of them.
    const child = startWorkerOnce({ WORKER_BATCH_SIZE: "20" });
    const measured = async () => Number((await sql<{ n: string }>(`SELECT count(*) AS n FROM measurements WHERE device_id = $1`, [other.device.id]))[0].n);
    const deadline = Date.now() + 60_000;
    while ((await measured()) === 0 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
    process.kill(-(child.pid as number), "SIGKILL");
    const partial = await measured();
    expect(partial).toBeGreaterThan(0);
    expect(partial).toBeLessThan(2000);
    await runWorkerOnce({ WORKER_QUIET: "1" });
    const [after] = await sql<{ n: string; distinct_readings: string }>(
      `SELECT count(*) AS n, count(DISTINCT reading_id) AS distinct_readings FROM measurements WHERE device_id = $1`,
      [other.device.id],
    );
    expect(after).toEqual({ n: "2000", distinct_readings: "2000" });
  }, 240_000);
});

describe("rollups and readings measured before", () => {
  it("roll up as PostgreSQL's own date_bin, count, sum, min and max of the measurements do", async () => {
    // The worker sums its buckets in JavaScript; the database recomputing them from the stored
    // measurements is the independent reference (statuses other than 'ok' count in n_all only).
    const reference = await sql<Record<string, number | string | null>>(
      `SELECT b.s AS bucket_s, date_bin(make_interval(secs => b.s), m.at, timestamptz '2000-01-01 00:00:00+00') AS bucket_start,
              count(*)::int AS n_all, (count(*) FILTER (WHERE status = 'ok'))::int AS n,
              sum(distance_m) FILTER (WHERE status = 'ok') AS distance_sum, min(distance_m) FILTER (WHERE status = 'ok') AS distance_min,
              max(distance_m) FILTER (WHERE status = 'ok') AS distance_max, sum(volume_l) FILTER (WHERE status = 'ok') AS volume_sum
       FROM measurements m CROSS JOIN (VALUES (300), (3600)) AS b(s) WHERE m.asset_id = $1 GROUP BY 1, 2 ORDER BY 1, 2`,
      [tank.tank.id],
    );
    const stored = await sql<Record<string, number | string | null>>(
      `SELECT bucket_s, bucket_start, n_all, n, distance_sum, distance_min, distance_max, volume_sum FROM measurement_rollups
       WHERE asset_id = $1 ORDER BY bucket_s, bucket_start`,
      [tank.tank.id],
    );
    expect(stored.length).toBe(reference.length);
    expect(reference.length).toBeGreaterThan(10);
    stored.forEach((row, i) => {
      const ref = reference[i];
      expect([row.bucket_s, String(row.bucket_start), row.n_all, row.n, row.distance_min, row.distance_max]).toEqual([
        ref.bucket_s,
        String(ref.bucket_start),
        ref.n_all,
        ref.n,
        ref.distance_min,
        ref.distance_max,
      ]);
      // Sums may differ in the last bits with the order of addition.
      expect(Math.abs(Number(row.distance_sum) - Number(ref.distance_sum))).toBeLessThan(1e-9);
      expect(Math.abs(Number(row.volume_sum) - Number(ref.volume_sum))).toBeLessThan(1e-6);
    });
  });

  it("keep a reading queued again after it was measured at its one measurement, rolled up once", async () => {
    const again = await createTankWithDevice(admin, { device: { expected_interval_s: 3600 } });
    const t0 = Date.now() - 30 * 60_000;
    const reading = (k: number) => ({ seq: k + 1, at: new Date(t0 + k * 60_000).toISOString(), channel: 0, echo_us: Math.round(echoFor(1.2, C20) * 10) / 10, air_temp_c: 20 });
    await sendReadings(again.apiKey, [0, 1, 2].map(reading));
    await runWorkerOnce();
    // As if a queue row outlived its measurement's transaction: the same reading waits again, beside a new one.
    await sql(
      `INSERT INTO reading_queue (reading_id, at, device_id, channel, echo_us, air_temp_c)
       SELECT id, at, device_id, channel, echo_us, air_temp_c FROM readings WHERE device_id = $1 AND seq = 1`,
      [again.device.id],
    );
    await sendReadings(again.apiKey, [reading(3)]);
    await runWorkerOnce();

    const [counts] = await sql<{ n: number; readings: number; queued: number }>(
      `SELECT (SELECT count(*)::int FROM measurements WHERE device_id = $1) AS n, (SELECT count(DISTINCT reading_id)::int FROM measurements WHERE device_id = $1) AS readings,
              (SELECT count(*)::int FROM reading_queue WHERE device_id = $1) AS queued`,
      [again.device.id],
    );
    expect(counts).toEqual({ n: 4, readings: 4, queued: 0 });
    const rolled = await sql<{ bucket_s: number; n: number }>(
      `SELECT bucket_s, sum(n_all)::int AS n FROM measurement_rollups WHERE asset_id = $1 GROUP BY bucket_s ORDER BY bucket_s`,
      [again.tank.id],
    );
    expect(rolled).toEqual([{ bucket_s: 300, n: 4 }, { bucket_s: 3600, n: 4 }]);
  }, 120_000);
});
