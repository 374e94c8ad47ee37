import { Organisation, User } from "../lib/db/models";
import { getSequelize } from "../lib/db/sequelize";
import { env } from "../lib/env";
import { hashPassword } from "../lib/auth/passwords";
import { writeAudit } from "../lib/services/audit";
import { DEMO_ACCOUNTS, DEMO_ORGANISATION, DEMO_PASSWORD } from "./seeds/demo-accounts";
import { seedDemoFleet } from "./seeds/demo-fleet";
import { seedDemoAlarmHistory, seedDemoAlarms } from "./seeds/demo-alarms";

// Seeds the demo scenario into an empty database. Refuses in production unless explicitly asked.
async function main() {
  if (!env.demoAllowed) {
    process.stdout.write("[halftrip] production: demo data is not seeded\n");
    return;
  }
  const sequelize = getSequelize();
  if ((await Organisation.count()) > 0) {
    process.stdout.write("[halftrip] database already has data: seed skipped\n");
    await seedDemoFleet({ onlyKeys: true });
    const demo = await Organisation.findOne({ where: { name: DEMO_ORGANISATION } });
    if (demo) await seedDemoAlarms(demo.id);
    return;
  }
  const hash = await hashPassword(DEMO_PASSWORD);
  const org = await sequelize.transaction(async (transaction) => {
    const o = await Organisation.create({ name: DEMO_ORGANISATION }, { transaction });
    for (const a of DEMO_ACCOUNTS) {
      await User.create({ organisation_id: o.id, email: a.email, name: a.name, role: a.role, status: "active", password_hash: hash }, { transaction });
    }
    await writeAudit({ organisationId: o.id, userId: null, label: "seed" }, "demo.seed", { type: "organisation", id: o.id }, {}, transaction);
    return o;
  });
  await seedDemoFleet({ organisationId: org.id });
  await seedDemoAlarms(org.id);
  await seedDemoAlarmHistory(org.id);
  process.stdout.write(`[halftrip] demo scenario seeded (${DEMO_ACCOUNTS.length} accounts)\n`);
}

main()
  .then(() => getSequelize().close())
  .catch((err) => {
    console.error(err);
    process.exit(1);
  });
