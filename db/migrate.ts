import path from "node:path";
import { Umzug, SequelizeStorage } from "umzug";
import type { QueryInterface } from "sequelize";
import { getSequelize } from "../lib/db/sequelize";

export type Migration = (params: { context: QueryInterface }) => Promise<void>;

export function createMigrator() {
  const sequelize = getSequelize();
  return new Umzug({
    migrations: { glob: path.join(__dirname, "migrations/*.ts").replace(/\\/g, "/") },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: "schema_migrations" }),
    logger: undefined,
  });
}

async function main() {
  const migrator = createMigrator();
  const direction = process.argv[2] ?? "up";
  const done = direction === "down" ? await migrator.down() : await migrator.up();
  process.stdout.write(`[halftrip] migrations ${direction}: ${done.length ? done.map((m) => m.name).join(", ") : "nothing to do"}\n`);
  await getSequelize().close();
}

if (require.main === module) {
  main().catch((err) => {
    console.error(err);
    process.exit(1);
  });
}
