import { z } from "zod";
import { INSTANT_RANGE_MESSAGE, isSaneInstant } from "./common";

const DAY_MS = 86_400_000;

const instant = (what: string) => z.coerce.date({ message: `${what} is a date and time, e.g. 2026-03-14T06:30:00Z.` }).refine(isSaneInstant, `${what}: ${INSTANT_RANGE_MESSAGE}`);

/** Longest period one request may cover, by bucket: about 8 900 five-minute or 9 600 hourly points. */
export const SERIES_MAX_DAYS = { "5m": 31, "1h": 400 } as const;
export const SERIES_BUCKET_SECONDS = { "5m": 300, "1h": 3600 } as const;
export type SeriesBucket = keyof typeof SERIES_BUCKET_SECONDS;

export const MEASUREMENTS_MAX_LIMIT = 10_000;

// Period defaults are applied by the handler (relative to the request's time), so only order is checked here.
const fromBeforeTo = (q: { from?: Date; to?: Date }) => !q.from || !q.to || q.from < q.to;

export const measurementsQuerySchema = z
  .object({
    from: instant("from").optional(),
    to: instant("to").optional(),
    limit: z.coerce
      .number({ message: "limit is a whole number." })
      .int("limit is a whole number.")
      .min(1, "limit is at least 1.")
      .max(MEASUREMENTS_MAX_LIMIT, `limit is at most ${MEASUREMENTS_MAX_LIMIT}.`)
      .default(1000),
    order: z.enum(["asc", "desc"], { message: "order is asc or desc." }).default("desc"),
  })
  .refine(fromBeforeTo, { message: "from must be before to.", path: ["from"] });
export type MeasurementsQuery = z.infer<typeof measurementsQuerySchema>;

/** The per-bucket figures a series can carry; `fields` picks some of them for the compact, column-wise answer. */
export const SERIES_FIELDS = [
  "n", "n_all", "distance_m", "distance_min_m", "distance_max_m", "level_m", "level_min_m", "level_max_m", "volume_l", "volume_min_l", "volume_max_l",
  "fill_pct", "fill_min_pct", "fill_max_pct", "air_temp_c", "air_temp_min_c", "air_temp_max_c", "uncertainty_m", "occupied_fraction",
] as const;
export type SeriesField = (typeof SERIES_FIELDS)[number];

export const seriesQuerySchema = z
  .object({
    from: instant("from").optional(),
    to: instant("to").optional(),
    bucket: z.enum(["5m", "1h"], { message: "bucket is 5m or 1h." }).default("1h"),
    fields: z
      .string()
      .transform((s) => s.split(","))
      .pipe(z.array(z.enum(SERIES_FIELDS, { message: `fields is a comma-separated list of ${SERIES_FIELDS.join(", ")}.` })).min(1))
      .optional(),
  })
  .refine(fromBeforeTo, { message: "from must be before to.", path: ["from"] })
  .refine((q) => !q.from || !q.to || q.to.getTime() - q.from.getTime() <= SERIES_MAX_DAYS[q.bucket] * DAY_MS, {
    message: `The period is at most ${SERIES_MAX_DAYS["5m"]} days for 5m buckets and ${SERIES_MAX_DAYS["1h"]} days for 1h buckets.`,
    path: ["to"],
  });
export type SeriesQuery = z.infer<typeof seriesQuerySchema>;

export const healthQuerySchema = z.object({
  /** Cleared flags newer than this many days are listed too. */
  days: z.coerce.number({ message: "days is a number." }).int("days is a whole number.").min(0, "days is 0 or more.").max(366, "days is at most 366.").default(30),
});
export type HealthQuery = z.infer<typeof healthQuerySchema>;

/** The period a query asks for, with the defaults: up to now, the last `defaultDays` days. */
export function resolvePeriod(q: { from?: Date; to?: Date }, defaultDays: number, now = new Date()): { from: Date; to: Date } {
  const to = q.to ?? (q.from ? new Date(Math.max(now.getTime(), q.from.getTime() + 1)) : now);
  const from = q.from ?? new Date(to.getTime() - defaultDays * DAY_MS);
  return { from, to };
}
