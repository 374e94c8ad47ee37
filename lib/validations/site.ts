import { z } from "zod";
import { uuidSchema, text } from "./common";

function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat("en", { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

const siteFields = {
  name: text().trim().min(1, "Give the site a name.").max(120, "Keep the name under 120 characters."),
  time_zone: text().refine(isTimeZone, "Use an IANA time zone such as Europe/Dublin."),
  latitude: z.number().min(-90, "Latitude is between -90 and 90.").max(90, "Latitude is between -90 and 90.").nullable().optional(),
  longitude: z.number().min(-180, "Longitude is between -180 and 180.").max(180, "Longitude is between -180 and 180.").nullable().optional(),
  air_temp_c: z.number().min(-50, "A fixed air temperature is between -50 and 70 °C.").max(70, "A fixed air temperature is between -50 and 70 °C.").nullable().optional(),
  humidity_pct: z.number().min(0, "Humidity is 0–100 %.").max(100, "Humidity is 0–100 %.").nullable().optional(),
  temperature_channel_id: uuidSchema.nullable().optional(),
  escalation_delay_min: z.number().int("Whole minutes.").min(1, "At least 1 minute.").max(1440, "At most 1440 minutes.").optional(),
};

export const createSiteSchema = z.object(siteFields).strict();
export const updateSiteSchema = z.object(siteFields).partial().strict();
export type SiteInput = z.infer<typeof createSiteSchema>;
