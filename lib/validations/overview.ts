import { z } from "zod";
import { INSTANT_RANGE_MESSAGE, isSaneInstant, text, uuidSchema } from "./common";

// Query strings of the live screens' routes: the asset screen's period and the device-health table's
// paging, sorting and filters. Shared by the route handlers and the screens that build the URLs.

/** Longest period the asset screen's side panels cover in one request. */
export const MAX_PERIOD_DAYS = 366;
const DAY_MS = 86_400_000;

const instant = (what: string) => z.coerce.date({ message: `${what} is a date and time (ISO 8601).` }).refine((d) => !Number.isNaN(d.getTime()), `${what} is a date and time (ISO 8601).`).refine(isSaneInstant, `${what}: ${INSTANT_RANGE_MESSAGE}`);

export const periodQuerySchema = z
  .object({ from: instant("from").optional(), to: instant("to").optional() })
  .strict()
  .transform((q, ctx) => {
    const to = q.to ?? new Date();
    const from = q.from ?? new Date(to.getTime() - 30 * DAY_MS);
    if (from >= to) ctx.addIssue({ code: "custom", path: ["to"], message: "to must be after from." });
    else if (to.getTime() - from.getTime() > MAX_PERIOD_DAYS * DAY_MS) ctx.addIssue({ code: "custom", path: ["from"], message: `A period spans at most ${MAX_PERIOD_DAYS} days.` });
    return { from, to };
  });
export type PeriodQuery = z.infer<typeof periodQuerySchema>;

export const DEVICE_HEALTH_SORTS = ["name", "site", "last_seen", "battery", "signal", "firmware", "flags"] as const;
export type DeviceHealthSort = (typeof DEVICE_HEALTH_SORTS)[number];
export const DEVICE_HEALTH_STATES = ["offline", "flagged", "healthy"] as const;
export const DEVICE_HEALTH_FLAGS = ["drift", "stuck", "noisy", "offline", "crosstalk_risk", "out_of_range", "no_echo"] as const;

export const deviceHealthQuerySchema = z
  .object({
    page: z.coerce.number().int().min(1, "page starts at 1.").default(1),
    page_size: z.coerce.number().int().min(1).max(200, "page_size is at most 200.").default(25),
    sort: z.enum(DEVICE_HEALTH_SORTS, { message: `sort is one of ${DEVICE_HEALTH_SORTS.join(", ")}.` }).default("name"),
    dir: z.enum(["asc", "desc"], { message: "dir is asc or desc." }).default("asc"),
    q: text().trim().max(100).optional(),
    site_id: uuidSchema.optional(),
    state: z.enum(DEVICE_HEALTH_STATES, { message: `state is one of ${DEVICE_HEALTH_STATES.join(", ")}.` }).optional(),
    flag: z.enum(DEVICE_HEALTH_FLAGS, { message: `flag is one of ${DEVICE_HEALTH_FLAGS.join(", ")}.` }).optional(),
  })
  .strict();
export type DeviceHealthQuery = z.infer<typeof deviceHealthQuerySchema>;
