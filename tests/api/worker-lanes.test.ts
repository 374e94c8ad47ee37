import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";
import { drainQueue, type BatchHook } from "@/lib/worker/batch";
import { getSequelize } from "@/lib/db/sequelize";
import { echoFor, practicalSpeed, sendReadings } from "./worker-support";

// Two workers drain one backlog side by side, each from its own lanes of devices (lib/worker/lanes.ts);
// the second joins while the first is under way, so lanes change hands mid-drain. Each channel's
// readings must still reach the stateful stages in time order: the batches that measured a channel,
// in the order they were written, cover successive stretches of its readings, whichever worker wrote
// them. Both drains run in this process (each with its own connections, as two workers have).

const C20 = practicalSpeed(20);
const PER_CHANNEL = 150;
const CHANNELS = [0, 1];
const BATCH = 60;

let admin: Agent;
const devices: string[] = [];

const laneOf = async (deviceId: string) => (await sql<{ lane: number }>(`SELECT uuid_hash($1::uuid) & 15 AS lane`, [deviceId]))[0].lane;

beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
  // Devices until both halves of the lanes hold at least two, so both workers have channels to measure.
  const lanes: number[] = [];
  while (devices.length < 12 && (lanes.filter((l) => l < 8).length < 2 || lanes.filter((l) => l >= 8).length < 2)) {
    const t = await createTankWithDevice(admin, { channels: CHANNELS, device: { expected_interval_s: 3600 } });
    devices.push(t.device.id);
    lanes.push(await laneOf(t.device.id));
    const start = Date.now() - (PER_CHANNEL + 10) * 5_000;
    // Invented: a tank drawn down 0.1 mm every 5 s with a 20 cm spike every 50th reading (the Hampel
    // filter's window carries over from batch to batch, so order matters to what it marks).
    const readings = CHANNELS.flatMap((channel) =>
      Array.from({ length: PER_CHANNEL }, (_, k) => {
        const distance = 1 + 0.0001 * k + (k % 50 === 49 ? 0.2 : 0);
        return { seq: k + 1, channel, at: new Date(start + k * 5_000 + channel * 100).toISOString(), echo_us: Math.round(echoFor(distance, C20) * 10) / 10, air_temp_c: 20 };
      }),
    );
    await sendReadings(t.apiKey, readings);
  }
}, 240_000);

afterAll(async () => {
  await getSequelize().close();
});

interface Written {
  worker: number;
  channelId: string;
  first: number;
  last: number;
  n: number;
}

describe("two workers draining by lanes", () => {
  it("measure every reading once and each channel's readings in time order, across lane hand-overs", async () => {
    const written: Written[] = [];
    let secondJoins: () => void = () => undefined;
    const firstHasWritten = new Promise<void>((resolve) => (secondJoins = resolve));
    // Runs inside each batch's transaction after its writes: a later batch of the same channel cannot
    // get there before this one commits (it waits for the channel's state row).
    const recorder = (worker: number): BatchHook => ({
      name: "order recorder",
      async run(batch) {
        const times = new Map<string, number[]>();
        for (const m of batch.measurements) {
          if (!m.channel || !devices.includes(m.channel.device.id)) continue;
          const list = times.get(m.channel.id) ?? [];
          list.push(m.reading.at.getTime());
          times.set(m.channel.id, list);
        }
        for (const [channelId, list] of times) written.push({ worker, channelId, first: Math.min(...list), last: Math.max(...list), n: list.length });
        if (worker === 1 && written.filter((w) => w.worker === 1).length >= 2 * CHANNELS.length) secondJoins();
      },
    });

    const first = drainQueue(BATCH, [recorder(1)]);
    await firstHasWritten;
    const second = drainQueue(BATCH, [recorder(2)]);
    const [one, two] = await Promise.all([first, second]);
    expect(one.batches).toBeGreaterThan(0);
    expect(two.batches).toBeGreaterThan(0);

    const channelIds = [...new Set(written.map((w) => w.channelId))];
    expect(channelIds).toHaveLength(devices.length * CHANNELS.length);
    for (const channelId of channelIds) {
      const batches = written.filter((w) => w.channelId === channelId);
      for (let i = 1; i < batches.length; i++) expect(batches[i].first).toBeGreaterThan(batches[i - 1].last);
      expect(batches.reduce((sum, b) => sum + b.n, 0)).toBe(PER_CHANNEL);
    }
    // Some channel was measured by both workers: a lane changed hands while it had readings waiting.
    expect(channelIds.some((id) => new Set(written.filter((w) => w.channelId === id).map((w) => w.worker)).size === 2)).toBe(true);

    const [counts] = await sql<{ measurements: number; distinct_readings: number; queued: number }>(
      `SELECT (SELECT count(*)::int FROM measurements WHERE device_id = ANY($1::uuid[])) AS measurements,
              (SELECT count(DISTINCT reading_id)::int FROM measurements WHERE device_id = ANY($1::uuid[])) AS distinct_readings,
              (SELECT count(*)::int FROM reading_queue WHERE device_id = ANY($1::uuid[])) AS queued`,
      [devices],
    );
    const total = devices.length * CHANNELS.length * PER_CHANNEL;
    expect(counts).toEqual({ measurements: total, distinct_readings: total, queued: 0 });
    // The spikes, judged against neighbours carried across batches and workers, are marked, and nothing else.
    const [suspects] = await sql<{ n: number }>(`SELECT count(*)::int AS n FROM measurements WHERE device_id = ANY($1::uuid[]) AND status = 'suspect'`, [devices]);
    expect(suspects.n).toBe(devices.length * CHANNELS.length * Math.floor(PER_CHANNEL / 50));
  }, 240_000);
});
