import { z } from "zod";
import { CLOCKS, DECIMAL_SEPARATORS, UNIT_SYSTEMS } from "../format/display";

// Display settings: the organisation's (admin) and a user's own (null = the organisation's). They change
// how figures are written and read back in forms, never what is stored or what the APIs answer (SI).
const unitSystem = z.enum(UNIT_SYSTEMS, { message: "Units are si (m, L, °C) or us (ft, in, US gal, °F)." });
const decimalSeparator = z.enum(DECIMAL_SEPARATORS, { message: 'The decimal separator is "." or ",".' });
const clock = z.enum(CLOCKS, { message: "The clock is 24h or 12h." });

export const displaySettingsSchema = z.object({ unit_system: unitSystem, decimal_separator: decimalSeparator, clock });

const ANY_FIELD = "Send at least one of unit_system, decimal_separator, clock.";

export const organisationDisplaySettingsSchema = displaySettingsSchema
  .partial()
  .strict()
  .refine((v) => Object.keys(v).length > 0, ANY_FIELD);

export const displayPreferencesSchema = z
  .object({ unit_system: unitSystem.nullable(), decimal_separator: decimalSeparator.nullable(), clock: clock.nullable() })
  .partial()
  .strict()
  .refine((v) => Object.keys(v).length > 0, ANY_FIELD);

export type OrganisationDisplaySettingsInput = z.infer<typeof organisationDisplaySettingsSchema>;
export type DisplayPreferencesInput = z.infer<typeof displayPreferencesSchema>;
