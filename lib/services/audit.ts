import type { Transaction } from "sequelize";
import { AuditEntry } from "../db/models";

export interface Actor {
  organisationId: string;
  userId: string | null;
  label: string;
}

/** One row per state-changing action, written in the caller's transaction when there is one. */
export async function writeAudit(
  actor: Actor,
  action: string,
  entity: { type: string; id?: string | null },
  details: Record<string, unknown> = {},
  transaction?: Transaction,
) {
  await AuditEntry.create(
    {
      organisation_id: actor.organisationId,
      actor_user_id: actor.userId,
      actor_label: actor.label,
      action,
      entity_type: entity.type,
      entity_id: entity.id ?? null,
      details,
    },
    { transaction },
  );
}
