// Export columns in a unit system. A column's name says its unit (level_m, volume_l, air_temp_c in SI;
// level_ft, volume_gal, air_temp_f in US customary), so a file read years later still says what its
// figures mean. SI columns stay available whatever a person reads (the export's `units=si`).

import { DISPLAY_UNITS, differenceFromSi, fromSi, type Unit, type UnitSystem } from "../units/units";

const SUFFIX: Record<Unit, string> = { m: "m", cm: "cm", mm: "mm", ft: "ft", in: "in", L: "l", m3: "m3", gal: "gal", degC: "c", degF: "f" };

/** What an SI column holds, read from its name: lengths end in _m, volumes in _l, temperatures in _c. */
type ColumnQuantity = "level" | "fineLength" | "volume" | "temperature";

function quantityOfColumn(name: string): ColumnQuantity | null {
  if (name.startsWith("uncertainty_") && name.endsWith("_m")) return "fineLength";
  if (name.endsWith("_m")) return "level";
  if (name.endsWith("_l")) return "volume";
  if (name.endsWith("_c")) return "temperature";
  return null;
}

export interface ExportUnits {
  system: UnitSystem;
  /** The column's name in this system: level_m → level_ft, uncertainty_m → uncertainty_in, volume_l → volume_gal. */
  column(siName: string): string;
  /** The unit a length, a length's uncertainty, a volume and a temperature are written in. */
  level: Unit;
  fineLength: Unit;
  volume: Unit;
  temperature: Unit;
  /** SI → this system; `fine` and `difference` carry no temperature offset (uncertainties). */
  length(m: number | null): number | null;
  fine(m: number | null): number | null;
  litres(l: number | null): number | null;
  celsius(c: number | null): number | null;
}

export function exportUnitsFor(system: UnitSystem): ExportUnits {
  const d = DISPLAY_UNITS[system];
  // SI files keep their uncertainty in metres (uncertainty_m), as they always had; US files in inches.
  const u = { ...d, fineLength: system === "si" ? d.level : d.fineLength };
  const units: Record<ColumnQuantity, Unit> = { level: u.level, fineLength: u.fineLength, volume: u.volume, temperature: u.temperature };
  const orNull = (f: (x: number) => number) => (x: number | null) => (x === null ? null : f(x));
  return {
    system,
    column(siName) {
      const q = quantityOfColumn(siName);
      return q === null ? siName : `${siName.slice(0, siName.lastIndexOf("_") + 1)}${SUFFIX[units[q]]}`;
    },
    level: u.level,
    fineLength: u.fineLength,
    volume: u.volume,
    temperature: u.temperature,
    length: orNull((m) => fromSi(m, u.level)),
    fine: orNull((m) => differenceFromSi(m, u.fineLength)),
    litres: orNull((l) => fromSi(l, u.volume)),
    celsius: orNull((c) => fromSi(c, u.temperature)),
  };
}
