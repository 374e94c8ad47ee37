import { z } from "zod";
import { INSTANT_RANGE_MESSAGE, isSaneInstant, text, uuidSchema } from "./common";
import { ALARM_KINDS, MAX_SHELVE_HOURS } from "../alarms/engine";
import { ALARM_PRIORITIES, ALARM_STATES } from "../alarms/state-machine";

/** "active" stands for every state but normal; several states may be given comma-separated. */
export const ALARM_STATE_FILTERS = ["active", ...ALARM_STATES] as const;
export const ALARM_SORTS = ["priority", "-priority", "activated_at", "-activated_at", "state", "-state", "site", "-site", "asset", "-asset", "kind", "-kind"] as const;
export type AlarmSort = (typeof ALARM_SORTS)[number];

const commaList = <T extends string>(values: readonly T[], what: string) =>
  text()
    .transform((s) => s.split(",").map((v) => v.trim()).filter(Boolean))
    .pipe(z.array(z.enum(values as [T, ...T[]], { message: `${what} is one of ${values.join(", ")}.` })));

const instant = (what: string) =>
  text()
    .refine((s) => Number.isFinite(Date.parse(s)), `${what} is an ISO 8601 time.`)
    .transform((s) => new Date(s))
    .refine(isSaneInstant, `${what}: ${INSTANT_RANGE_MESSAGE}`);

export const alarmListQuerySchema = z
  .object({
    state: commaList(ALARM_STATE_FILTERS, "state").optional(),
    site_id: uuidSchema.optional(),
    priority: commaList(ALARM_PRIORITIES, "priority").optional(),
    kind: commaList(ALARM_KINDS, "kind").optional(),
    asset_id: uuidSchema.optional(),
    device_id: uuidSchema.optional(),
    /** Alarms suppressed by design are left out unless asked for (or named in state). */
    include: z.enum(["suppressed"], { message: "include is suppressed." }).optional(),
    /** Adds the matching alarms grouped by cause, device or site with counts (lib/alarms/floods groupAlarms). */
    group: z.enum(["cause", "device", "site"], { message: "group is one of cause, device, site." }).optional(),
    from: instant("from").optional(),
    to: instant("to").optional(),
    sort: z.enum(ALARM_SORTS, { message: `sort is one of ${ALARM_SORTS.join(", ")}.` }).default("priority"),
    page: z.coerce.number().int().min(1, "page starts at 1.").default(1),
    page_size: z.coerce.number().int().min(1, "page_size is at least 1.").max(200, "page_size is at most 200.").default(50),
  })
  .refine((q) => !q.from || !q.to || q.from < q.to, { message: "from must be before to.", path: ["to"] });
export type AlarmListQuery = z.infer<typeof alarmListQuerySchema>;

const comment = text().trim().max(500, "Keep the comment under 500 characters.").optional();

export const acknowledgeSchema = z.object({ comment }).strict();

export const bulkAcknowledgeSchema = z
  .object({
    ids: z.array(uuidSchema).min(1, "Choose at least one alarm.").max(200, "Acknowledge at most 200 alarms at once."),
    comment,
  })
  .strict();

export const shelveSchema = z
  .object({
    reason: text({ message: "Give a reason for shelving." }).trim().min(1, "Give a reason for shelving.").max(500, "Keep the reason under 500 characters."),
    until: instant("until").optional(),
    duration_min: z.number().int("Whole minutes.").min(1, "Shelve for at least 1 minute.").max(MAX_SHELVE_HOURS * 60, `Shelve for at most ${MAX_SHELVE_HOURS} h.`).optional(),
    comment,
  })
  .strict()
  .refine((s) => (s.until === undefined) !== (s.duration_min === undefined), { message: "Give either until or duration_min.", path: ["duration_min"] });
export type ShelveInput = z.infer<typeof shelveSchema>;

/** The shelve's expiry; a problem with it is told on the field that set it. */
export function shelveExpiry(input: ShelveInput, now: Date): { until: Date } | { path: string; message: string } {
  const path = input.until ? "until" : "duration_min";
  const until = input.until ?? new Date(now.getTime() + (input.duration_min ?? 0) * 60_000);
  if (until.getTime() <= now.getTime()) return { path, message: "The shelve must end in the future." };
  if (until.getTime() > now.getTime() + MAX_SHELVE_HOURS * 3_600_000) return { path, message: `A shelve lasts at most ${MAX_SHELVE_HOURS} h.` };
  return { until };
}

export const outOfServiceSchema = z
  .object({ reason: text({ message: "Give a reason." }).trim().min(1, "Give a reason.").max(500, "Keep the reason under 500 characters."), comment })
  .strict();

/** A maintenance window on a device or a site (lib/alarms/maintenance.ts checks its length and reason). */
export const maintenanceSchema = z
  .object({
    mode: z.enum(["shelve", "out_of_service"], { message: "mode is shelve or out_of_service." }),
    reason: z.string({ message: "Give a reason." }).trim().max(500, "Keep the reason under 500 characters."),
    until: instant("until"),
  })
  .strict();
export type MaintenanceInput = z.infer<typeof maintenanceSchema>;

export const plainActionSchema = z.object({ comment }).strict();

export const ackLinkSchema = z.object({ token: text().min(10, "The link is incomplete.").max(400), comment }).strict();

export const alarmHealthQuerySchema = z
  .object({
    from: instant("from").optional(),
    to: instant("to").optional(),
    site_id: uuidSchema.optional(),
  })
  .refine((q) => !q.from || !q.to || q.from < q.to, { message: "from must be before to.", path: ["to"] });

/** An action body that may be left out entirely (`POST …/acknowledge` with no body is a plain acknowledge). */
export function parseOptionalBody<S extends z.ZodType>(text: string, schema: S): { ok: true; value: z.infer<S> } | { ok: false } {
  if (text.trim() === "") return { ok: true, value: schema.parse({}) };
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch {
    return { ok: false };
  }
  return { ok: true, value: schema.parse(body) };
}
