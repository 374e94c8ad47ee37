import { z } from "zod";
import { INSTANT_RANGE_MESSAGE, isSaneInstant, text, uuidSchema } from "./common";
import { UNIT_SYSTEMS } from "../format/display";

// CSV exports: a time range (a date means that day in UTC; a "to" date includes its whole day) no longer
// than MAX_EXPORT_DAYS, and what to export.
export const MAX_EXPORT_DAYS = 366;
export const MAX_EXPORT_ASSETS = 50;
const DAY_MS = 86_400_000;

const instant = z
  .union([z.iso.datetime({ offset: true }), z.iso.date()], {
    message: "Use a date (2026-03-14) or an ISO 8601 date-time with a zone (2026-03-14T06:30:00Z).",
  })
  .refine((v) => isSaneInstant(toInstant(v, false)), INSTANT_RANGE_MESSAGE);

function toInstant(value: string, end: boolean): Date {
  if (/^\d{4}-\d{2}-\d{2}$/.test(value)) return new Date(Date.parse(`${value}T00:00:00Z`) + (end ? DAY_MS : 0));
  return new Date(value);
}

export interface ExportRange {
  from: Date;
  to: Date;
}

/** Issues of a range as one message each; shared by the export form and the handlers. */
export function rangeIssues(range: ExportRange): { path: "from" | "to"; message: string }[] {
  if (range.to.getTime() <= range.from.getTime()) return [{ path: "to", message: "The range ends before it starts; choose a 'to' after 'from'." }];
  const days = (range.to.getTime() - range.from.getTime()) / DAY_MS;
  if (days > MAX_EXPORT_DAYS) return [{ path: "to", message: `The range spans ${Math.ceil(days)} days; an export covers at most ${MAX_EXPORT_DAYS} days. Export it in parts.` }];
  return [];
}

/** The unit system of an export's figures and column names; absent: the person's own (si keeps SI columns). */
const units = z.enum(UNIT_SYSTEMS, { message: "units is si (level_m, volume_l, air_temp_c) or us (level_ft, volume_gal, air_temp_f)." }).optional();

const rangeFields = { from: instant, to: instant, units };

function withRange<T extends { from: string; to: string }>(value: T, ctx: z.RefinementCtx) {
  for (const issue of rangeIssues({ from: toInstant(value.from, false), to: toInstant(value.to, true) })) {
    ctx.addIssue({ code: "custom", path: [issue.path], message: issue.message });
  }
}

function asRange<T extends { from: string; to: string }>(value: T): Omit<T, "from" | "to"> & ExportRange {
  return { ...value, from: toInstant(value.from, false), to: toInstant(value.to, true) };
}

export const measurementsExportQuery = z
  .object({
    ...rangeFields,
    asset_ids: text({ message: "Choose at least one asset." })
      .transform((s) => s.split(",").map((x) => x.trim()).filter(Boolean))
      .pipe(
        z
          .array(uuidSchema)
          .min(1, "Choose at least one asset.")
          .max(MAX_EXPORT_ASSETS, `Choose at most ${MAX_EXPORT_ASSETS} assets an export.`),
      ),
    /** "measured" (default): each figure to the digits its uncertainty supports; "full": as computed. */
    precision: z.enum(["measured", "full"]).default("measured"),
  })
  .superRefine(withRange)
  .transform(asRange);

export const alarmsExportQuery = z.object(rangeFields).superRefine(withRange).transform(asRange);

export const MAX_HORIZON_DAYS = 90;
export const refillPlanQuery = z.object({
  horizon_days: z.coerce
    .number({ message: "The horizon is a number of days." })
    .int("The horizon is a whole number of days.")
    .min(1, "The horizon is at least 1 day.")
    .max(MAX_HORIZON_DAYS, `The horizon is at most ${MAX_HORIZON_DAYS} days.`)
    .default(14),
  units,
});
