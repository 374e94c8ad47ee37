"use client";

// What the screens write figures and times in: the signed-in person's effective display settings
// (resolved on the server by lib/services/display-settings.ts, handed down by the app shell). Screens
// take their formatters from useFigures() and their number boxes from useQuantityInput(); nothing on a
// screen converts units by itself.

import { createContext, useContext, useMemo } from "react";
import { DEFAULT_DISPLAY_SETTINGS, figureOptionsOf, hourCycleOf, type DisplaySettings } from "@/lib/format/display";
import { figuresFor, type Figures } from "@/lib/format/figures";
import { quantityInputFor, type QuantityInput } from "@/lib/units/quantity-input";
import { TimeViewProvider } from "@/components/ui/site-time";

const DisplaySettingsContext = createContext<DisplaySettings>(DEFAULT_DISPLAY_SETTINGS);

export function DisplaySettingsProvider({ settings, children }: { settings: DisplaySettings; children: React.ReactNode }) {
  return (
    <DisplaySettingsContext.Provider value={settings}>
      <TimeViewProvider hourCycle={hourCycleOf(settings.clock)}>{children}</TimeViewProvider>
    </DisplaySettingsContext.Provider>
  );
}

export function useDisplaySettings(): DisplaySettings {
  return useContext(DisplaySettingsContext);
}

/** The person's figure formatters: fig.length(m, u), fig.volume(l), fig.temperature(c), … */
export function useFigures(): Figures {
  const settings = useContext(DisplaySettingsContext);
  return useMemo(() => figuresFor(figureOptionsOf(settings)), [settings]);
}

/** Number boxes in the person's units and decimal sign; one per form, so untouched values read back exactly. */
export function useQuantityInput(): QuantityInput {
  const settings = useContext(DisplaySettingsContext);
  return useMemo(() => quantityInputFor(settings), [settings]);
}

type FigureKind = "length" | "volume" | "temperature" | "percent" | "volts" | "dbm";

/** One figure, for table cells defined outside a component: <Figure kind="volume" value={l} />. */
export function Figure({ kind, value, uncertainty }: { kind: FigureKind; value: number | null | undefined; uncertainty?: number | null }) {
  const fig = useFigures();
  return <>{kind === "length" ? fig.length(value, uncertainty) : fig[kind](value)}</>;
}
