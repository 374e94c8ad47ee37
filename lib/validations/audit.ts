import { z } from "zod";
import { text } from "./common";

export const auditQuerySchema = z.object({
  entity_id: text().max(100).optional(),
  entity_type: text().max(50).optional(),
  page: z.coerce.number().int().min(1, "page starts at 1.").default(1),
  page_size: z.coerce.number().int().min(1).max(200, "page_size is at most 200.").default(50),
});
export type AuditQuery = z.infer<typeof auditQuerySchema>;
