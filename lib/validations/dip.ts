import { z } from "zod";
import { INSTANT_RANGE_MESSAGE, isSaneInstant, text } from "./common";

// A manual dip: the level a technician read with a tape or dipstick, when, and a note.
export const MAX_DIP_FUTURE_MS = 5 * 60 * 1000;
export const MAX_DIP_NOTE = 500;

export const dipLevelSchema = z
  .number({ message: "The dipped level is a number of metres." })
  .min(0, "The dipped level is 0 m or more (from the tank bottom).")
  .max(100, "The dipped level is at most 100 m.");

export const dipNoteSchema = text().trim().max(MAX_DIP_NOTE, `Keep the note under ${MAX_DIP_NOTE} characters.`);

export const recordDipSchema = z
  .object({
    at: z.iso
      .datetime({ offset: true, message: "The time is an ISO 8601 date-time with a zone, like 2026-03-14T06:30:00Z." })
      .refine((at) => Date.parse(at) <= Date.now() + MAX_DIP_FUTURE_MS, "The dip's time lies in the future; check the clock.")
      .refine((at) => isSaneInstant(new Date(at)), INSTANT_RANGE_MESSAGE)
      .optional(),
    level_m: dipLevelSchema,
    note: dipNoteSchema.optional(),
  })
  .strict();
export type RecordDipInput = z.infer<typeof recordDipSchema>;
