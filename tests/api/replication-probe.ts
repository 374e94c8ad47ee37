// Run by read-replicas.test.ts as a process of its own (tsx) with DATABASE_REPLICA_URLS set: two pools
// on the same server, told apart by application_name, the read pool read-only as a replica is. Prints
// as JSON which pool each kind of statement was given (Sequelize's `queryType` of the connection) and
// which session answered it, or the error it met.
import { findDeviceByKeyPrefix, storeReadings } from "../../lib/services/ingest";
import { getSequelize, onPrimary } from "../../lib/db/sequelize";
import { sqlRows, sqlRun } from "../../lib/db/sql";
import { Organisation } from "../../lib/db/models";
import { prefixOfDeviceKey } from "../../lib/auth/device-keys";

const sequelize = getSequelize();
let pools: string[] = [];
sequelize.addHook("afterPoolAcquire", (connection) => {
  pools.push((connection as { queryType?: string }).queryType ?? "single");
});

const WHO = `SELECT current_setting('application_name') AS session`;

/** Which pools `work` took connections from (each once), and what it answered (or the error it met). */
async function probe(work: () => Promise<unknown>) {
  pools = [];
  try {
    const answer = await work();
    return { pools: [...new Set(pools)], answer };
  } catch (err) {
    return { pools: [...new Set(pools)], error: (err as Error).message };
  }
}
const session = (rows: { session: string }[]) => rows[0]?.session;

async function main() {
  const [deviceId, apiKey] = process.argv.slice(2);
  const out = {
    plainRead: await probe(async () => session(await sqlRows(WHO))),
    namedRead: await probe(async () => session(await sqlRows(`${WHO} WHERE :one = 1`, { one: 1 }))),
    preparedRead: await probe(async () => session(await sqlRows(WHO, [], { name: "halftrip_probe_session" }))),
    primaryRead: await probe(async () => session(await sqlRows(WHO, [], { primary: true }))),
    readInOnPrimary: await probe(() => onPrimary(async () => session(await sqlRows(WHO)))),
    readInTransaction: await probe(() => sequelize.transaction(async (transaction) => session(await sqlRows(WHO, [], { transaction })))),
    write: await probe(async () =>
      session(await sqlRows(`WITH w AS (INSERT INTO sign_in_known_addresses (email, address, last_success_at) VALUES ('replication-probe@example.org', 'probe', now()) ON CONFLICT (email, address) DO UPDATE SET last_success_at = now() RETURNING 1) ${WHO} FROM w`)),
    ),
    modelRead: await probe(async () => (await Organisation.findOne({ attributes: [[sequelize.literal("current_setting('application_name')"), "session"]], raw: true })) as unknown),
    keyCheck: await probe(async () => (await findDeviceByKeyPrefix(prefixOfDeviceKey(apiKey) ?? ""))?.id === deviceId),
    ingest: await probe(async () => (await storeReadings(deviceId, [{ channel: 0, seq: 1, echo_us: 5000 }] as Parameters<typeof storeReadings>[1], new Date())).accepted),
  };
  await sqlRun(`DELETE FROM sign_in_known_addresses WHERE email = 'replication-probe@example.org'`);
  console.log(JSON.stringify(out));
  await sequelize.close();
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
