import { z } from "zod";
import { uuidSchema, text } from "./common";

// Which dips a calibration is fitted to; the server fits again from them when it applies, so a client
// never sends the offset and scale itself.
export const MAX_CALIBRATION_DIPS = 100;

export const calibrationRequestSchema = z
  .object({
    dip_ids: z
      .array(uuidSchema, { message: "dip_ids is a list of dip ids." })
      .min(2, "Choose at least two dips.")
      .max(MAX_CALIBRATION_DIPS, `Choose at most ${MAX_CALIBRATION_DIPS} dips.`)
      .refine((ids) => new Set(ids).size === ids.length, "Each dip once."),
    note: text().trim().max(500, "Keep the note under 500 characters.").optional(),
  })
  .strict();
export type CalibrationRequest = z.infer<typeof calibrationRequestSchema>;
