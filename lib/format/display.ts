// The display settings of a person: unit system, decimal separator and clock. The organisation sets
// them; a user may choose their own of each (null follows the organisation). Everything a person reads
// (screens, charts, e-mails, exports) is written from the effective settings resolved here; what is
// stored and what the APIs answer stays SI.

import type { FigureOptions } from "./number";
import type { HourCycle } from "./time";
import type { UnitSystem } from "../units/units";

export const UNIT_SYSTEMS = ["si", "us"] as const satisfies readonly UnitSystem[];
export const DECIMAL_SEPARATORS = [".", ","] as const;
export const CLOCKS = ["24h", "12h"] as const;
export type DecimalSeparator = (typeof DECIMAL_SEPARATORS)[number];
export type Clock = (typeof CLOCKS)[number];

export interface DisplaySettings {
  unit_system: UnitSystem;
  decimal_separator: DecimalSeparator;
  clock: Clock;
}

/** A user's own choices; null (or absent) follows the organisation. */
export type DisplayOverrides = { [K in keyof DisplaySettings]?: DisplaySettings[K] | null };

export const DEFAULT_DISPLAY_SETTINGS: DisplaySettings = { unit_system: "si", decimal_separator: ".", clock: "24h" };

export const UNIT_SYSTEM_LABELS: Record<UnitSystem, string> = { si: "SI (m, mm, L, °C)", us: "US customary (ft, in, US gal, °F)" };
export const DECIMAL_SEPARATOR_LABELS: Record<DecimalSeparator, string> = { ".": "point (2.5)", ",": "comma (2,5)" };
export const CLOCK_LABELS: Record<Clock, string> = { "24h": "24-hour (14:05)", "12h": "12-hour (2:05 PM)" };

export function resolveDisplaySettings(organisation: DisplaySettings, own: DisplayOverrides = {}): DisplaySettings {
  return {
    unit_system: own.unit_system ?? organisation.unit_system,
    decimal_separator: own.decimal_separator ?? organisation.decimal_separator,
    clock: own.clock ?? organisation.clock,
  };
}

/**
 * A locale whose numbers use the chosen decimal sign. Only its decimal sign is used: digits are grouped
 * by a narrow no-break space whatever the locale (lib/format/number.ts), and parsing accepts spaces.
 */
export function numberLocaleOf(decimal: DecimalSeparator): string {
  return decimal === "," ? "de-DE" : "en-GB";
}

export function figureOptionsOf(s: DisplaySettings): FigureOptions {
  return { system: s.unit_system, locale: numberLocaleOf(s.decimal_separator) };
}

export function hourCycleOf(clock: Clock): HourCycle {
  return clock === "12h" ? "h12" : "h23";
}
