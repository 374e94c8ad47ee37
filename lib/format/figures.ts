// The figures of the screens, bound to a person's display settings: the unit of their system beside
// every value, their decimal sign, and no digit the uncertainty does not support (the uncertainty is
// converted to the displayed unit first, then rounded). Pure: the client hook (components/ui/display-
// settings.tsx), e-mails and exports build it from the settings lib/services/display-settings.ts resolves.

import { formatLength, formatNumber, formatTemperature, formatVolume, type FigureOptions } from "./number";
import { COVERAGE_FACTOR } from "../uncertainty/budget";
import { DISPLAY_UNITS, fromSi, UNIT_SYMBOLS, type LengthUnit } from "../units/units";

const NBSP = "\u00a0";

export interface Figures {
  options: FigureOptions;
  /**
   * A length with its expanded uncertainty U = k·u (the standard uncertainty u given, k = 2):
   * "1.84 m ± 12 mm (k=2)", "6.04 ft ± 0.47 in (k=2)"; without one, to the millimetre (0.01 ft).
   */
  length(m: number | null | undefined, standardUncertaintyM?: number | null): string;
  /** A volume to four significant figures, never finer than 1 L or 0.1 US gal. */
  volume(litres: number | null | undefined): string;
  temperature(celsius: number | null | undefined): string;
  /** Fill as a whole percentage: "63 %". */
  percent(pct: number | null | undefined): string;
  volts(v: number | null | undefined): string;
  dbm(dbm: number | null | undefined): string;
  /** A whole number, thousands grouped: "16 000 000". */
  count(n: number): string;
  /** A plain number to a number of decimals, in the person's decimal sign. */
  number(value: number, decimals: number): string;
  /** The unit a level is shown in, its symbol, and a level in it (for chart axes). */
  levelUnit: LengthUnit;
  levelSymbol: string;
  levelFromSi(m: number): number;
  /** The scale an air temperature is shown in, its symbol, and a temperature in it. */
  temperatureSymbol: string;
  temperatureFromSi(celsius: number): number;
}

export function figuresFor(o: FigureOptions): Figures {
  const { level: levelUnit, temperature: temperatureUnit } = DISPLAY_UNITS[o.system];
  const plain = (unit: string, decimals: number) => (x: number | null | undefined) => (x == null || !Number.isFinite(x) ? "—" : `${formatNumber(x, decimals, o.locale)}${NBSP}${unit}`);
  return {
    options: o,
    length(m, u) {
      if (m == null || !Number.isFinite(m)) return "—";
      if (u == null || !(u > 0)) return formatLength(m, null, o);
      return `${formatLength(m, COVERAGE_FACTOR * u, o)}${NBSP}(k=${COVERAGE_FACTOR})`;
    },
    volume: (l) => formatVolume(l, null, o),
    temperature: (c) => formatTemperature(c, o),
    percent: plain("%", 0),
    volts: plain("V", 2),
    dbm: plain("dBm", 0),
    count: (n) => formatNumber(n, 0, o.locale),
    number: (value, decimals) => formatNumber(value, decimals, o.locale),
    levelUnit,
    levelSymbol: UNIT_SYMBOLS[levelUnit],
    levelFromSi: (m) => fromSi(m, levelUnit),
    temperatureSymbol: UNIT_SYMBOLS[temperatureUnit],
    temperatureFromSi: (c) => fromSi(c, temperatureUnit),
  };
}
