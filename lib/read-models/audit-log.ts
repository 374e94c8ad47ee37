import { AuditEntry } from "../db/models";
import type { AuditQuery } from "../validations/audit";

export async function listAuditEntries(organisationId: string, q: AuditQuery) {
  const where: Record<string, unknown> = { organisation_id: organisationId };
  if (q.entity_id) where.entity_id = q.entity_id;
  if (q.entity_type) where.entity_type = q.entity_type;
  const { rows, count } = await AuditEntry.findAndCountAll({ where, order: [["at", "DESC"], ["id", "DESC"]], limit: q.page_size, offset: (q.page - 1) * q.page_size });
  return {
    total: count,
    page: q.page,
    page_size: q.page_size,
    items: rows.map((r) => ({ id: Number(r.id), at: r.at, actor: r.actor_label, action: r.action, entity_type: r.entity_type, entity_id: r.entity_id, details: r.details })),
  };
}
