import { QueryTypes } from "sequelize";
import { getSequelize } from "../db/sequelize";

/** A read-only query with named replacements, as plain rows. */
export async function select<T extends object>(sql: string, replacements: Record<string, unknown>): Promise<T[]> {
  return getSequelize().query<T>(sql, { replacements, type: QueryTypes.SELECT });
}
