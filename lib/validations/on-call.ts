import { z } from "zod";
import { uuidSchema } from "./common";

/** The whole ordered list at once: first to be e-mailed first. */
export const putOnCallSchema = z
  .object({
    user_ids: z.array(uuidSchema).max(20, "An on-call list holds at most 20 people."),
  })
  .strict()
  .refine((v) => new Set(v.user_ids).size === v.user_ids.length, { message: "Each person appears once.", path: ["user_ids"] });
export type PutOnCallInput = z.infer<typeof putOnCallSchema>;
