import { describe, expect, it } from "vitest";
import { createOtherOrganisation, sql } from "../support/db";
import { runWorkerOnce } from "../support/worker";

// Retention (issue 16): the worker's daily upkeep drops whole monthly partitions of readings and
// measurements once every organisation's retention has passed them, and deletes the older rows of an
// organisation that keeps less than the others; recent months and rollups stay.
const DAY_MS = 86_400_000;

async function deviceOf(organisationId: string): Promise<string> {
  const [site] = await sql<{ id: string }>(`INSERT INTO sites (organisation_id, name) VALUES ($1, 'Retention site') RETURNING id`, [organisationId]);
  const [device] = await sql<{ id: string }>(
    `INSERT INTO devices (organisation_id, site_id, serial, name, profile) VALUES ($1, $2, 'RET-' || left(md5(random()::text), 8), 'Retention unit', 'echo') RETURNING id`,
    [organisationId, site.id],
  );
  return device.id;
}

/** One reading (with its idempotency key, as the ingest stores it) and its measurement at `at`, written as the worker would have left them (not queued). */
async function storeMeasured(deviceId: string, seq: number, at: Date): Promise<string> {
  await sql(`INSERT INTO reading_keys (device_id, channel, seq) VALUES ($1, 0, $2)`, [deviceId, seq]);
  const [reading] = await sql<{ id: string }>(`INSERT INTO readings (device_id, channel, seq, at, echo_us) VALUES ($1, 0, $2, $3, 5831) RETURNING id`, [deviceId, seq, at]);
  await sql(`INSERT INTO measurements (reading_id, at, device_id, channel_index, status) VALUES ($1, $2, $3, 0, 'no_echo')`, [reading.id, at, deviceId]);
  return reading.id;
}

/** The seqs of a device whose idempotency keys are still stored. */
const keysOf = async (deviceId: string) => (await sql<{ seq: string }>(`SELECT seq::text FROM reading_keys WHERE device_id = $1 ORDER BY seq`, [deviceId])).map((r) => Number(r.seq));

const kept = async (table: "readings" | "measurements", ids: string[]) =>
  (await sql<{ id: string }>(`SELECT ${table === "readings" ? "id" : "reading_id"}::text AS id FROM ${table} WHERE ${table === "readings" ? "id" : "reading_id"} = ANY($1::bigint[])`, [ids])).map((r) => r.id).sort();

describe("retention", () => {
  it("drops months past every organisation's retention and deletes the older rows of an organisation that keeps less", async () => {
    const short = await createOtherOrganisation();
    const usual = await createOtherOrganisation();
    await sql(`UPDATE organisations SET reading_retention_days = 31, measurement_retention_days = 40 WHERE id = $1`, [short.organisationId]);
    const [longest] = await sql<{ days: number }>(`SELECT max(measurement_retention_days) AS days FROM organisations`);
    // A month well past the longest retention: its partitions, made as the worker makes them.
    const old = new Date(Date.now() - (longest.days + 400) * DAY_MS);
    const oldMonth = `${old.getUTCFullYear()}_${String(old.getUTCMonth() + 1).padStart(2, "0")}`;
    const oldFirst = `${old.getUTCFullYear()}-${String(old.getUTCMonth() + 1).padStart(2, "0")}-01`;
    await sql(`SELECT ensure_reading_partitions($1::date, 1), ensure_measurement_partitions($1::date, 1)`, [oldFirst]);
    const shortDevice = await deviceOf(short.organisationId);
    const usualDevice = await deviceOf(usual.organisationId);
    await storeMeasured(usualDevice, 1, new Date(Date.parse(oldFirst) + 3 * DAY_MS));
    const shortOld = await storeMeasured(shortDevice, 2, new Date(Date.now() - 50 * DAY_MS));
    const shortRecent = await storeMeasured(shortDevice, 3, new Date(Date.now() - 10 * DAY_MS));
    const usualFifty = await storeMeasured(usualDevice, 4, new Date(Date.now() - 50 * DAY_MS));
    const shortReadingOnly = await storeMeasured(shortDevice, 5, new Date(Date.now() - 35 * DAY_MS));
    const fiftyDaysAgo = new Date(Date.now() - 50 * DAY_MS);
    const recentMonth = `${fiftyDaysAgo.getUTCFullYear()}_${String(fiftyDaysAgo.getUTCMonth() + 1).padStart(2, "0")}`;

    await runWorkerOnce();

    const partitions = await sql<{ name: string }>(`SELECT relname AS name FROM pg_class WHERE relname = ANY($1)`, [
      [`readings_${oldMonth}`, `measurements_${oldMonth}`, `readings_${recentMonth}`, `measurements_${recentMonth}`],
    ]);
    expect(partitions.map((p) => p.name).sort()).toEqual([`measurements_${recentMonth}`, `readings_${recentMonth}`]);
    // 31 days of readings and 40 of measurements for the short organisation; 90 and 730 (the defaults) for the other.
    expect(await kept("readings", [shortOld, shortRecent, usualFifty, shortReadingOnly])).toEqual([shortRecent, usualFifty].sort());
    expect(await kept("measurements", [shortOld, shortRecent, usualFifty, shortReadingOnly])).toEqual([shortRecent, usualFifty, shortReadingOnly].sort());
    // The ingest's keys go with their readings: seq 1 with its dropped month, 2 and 5 with the short
    // organisation's deleted rows; 3 and 4 stay with their readings.
    expect(await keysOf(shortDevice)).toEqual([3]);
    expect(await keysOf(usualDevice)).toEqual([4]);
  });
});
