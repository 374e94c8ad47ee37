import { z } from "zod";

export const uuidSchema = z.string().uuid("Use the id as the API gave it.");

export function isUuid(value: string): boolean {
  return uuidSchema.safeParse(value).success;
}
