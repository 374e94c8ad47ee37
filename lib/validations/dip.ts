import { z } from "zod";
import { INSTANT_RANGE_MESSAGE, isSaneInstant, text } from "./common";
import { DIP_CLOCK_SLACK_MS } from "../input-checks/questions";

// A manual dip: the level a technician read with a tape or dipstick, when, and a note. How high a dip
// may read depends on the tank, so that bound is checked against the tank (lib/input-checks/questions.ts),
// never against a fixed figure here.
export const MAX_DIP_NOTE = 500;
export const MAX_VOID_REASON = 500;

export const dipLevelSchema = z
  .number({ message: "The dipped level is a number of metres." })
  .min(0, "The dipped level is 0 m or more (from the tank bottom).");

export const dipNoteSchema = text().trim().max(MAX_DIP_NOTE, `Keep the note under ${MAX_DIP_NOTE} characters.`);

export const recordDipSchema = z
  .object({
    at: z.iso
      .datetime({ offset: true, message: "The time is an ISO 8601 date-time with a zone, like 2026-03-14T06:30:00Z." })
      .refine((at) => Date.parse(at) <= Date.now() + DIP_CLOCK_SLACK_MS, "The dip is dated in the future; check its date, time and time zone.")
      .refine((at) => isSaneInstant(new Date(at)), INSTANT_RANGE_MESSAGE)
      .optional(),
    level_m: dipLevelSchema,
    note: dipNoteSchema.optional(),
  })
  .strict();
export type RecordDipInput = z.infer<typeof recordDipSchema>;

/** Voiding a dip: it stays listed, struck through with the reason, and no longer counts anywhere. */
export const voidDipSchema = z
  .object({ reason: text().trim().min(3, "Say why the dip is void (at least 3 characters).").max(MAX_VOID_REASON, `Keep the reason under ${MAX_VOID_REASON} characters.`) })
  .strict();
export type VoidDipInput = z.infer<typeof voidDipSchema>;

