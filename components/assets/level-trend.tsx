"use client";

import dynamic from "next/dynamic";
import type { EChartsOption } from "echarts";
import { Loading } from "@/components/ui/data-state";
import type { TrendData } from "@/components/assets/asset-live-series";
import { axisZoneTitle, formatAxisLabel, formatDate, formatDateTime, type TimeDisplay } from "@/lib/format/time";
import { useTimeDisplay } from "@/components/ui/site-time";
import { useFigures } from "@/components/ui/display-settings";
import type { Figures } from "@/lib/format/figures";

// The trend of LOOK.md in echarts: compensated as a thin ink line, raw as a dashed muted line, air
// temperature on a right axis, setpoints as dashed horizontals labelled at the right edge, the
// uncertainty as a translucent band, the forecast dotted to its reorder date, manual dips as points
// and calibration changes as marks. No gradients, no animation. Loaded in the browser only.

const ReactECharts = dynamic(() => import("echarts-for-react"), { ssr: false, loading: () => <Loading label="Drawing the trend…" /> });

// Tailwind palette (tailwind.config.ts), repeated here because echarts draws on a canvas.
const INK = "#1f2a30";
const MUTED = "#6b7275";
const RULE = "#d9d6cc";
const LIQUID = "#8ea3ad";

export interface TrendMarks {
  setpoints: { key: string; value_m: number }[];
  forecast: [number, number][];
  dips: { atMs: number; levelM: number; label: string }[];
  calibrations: { atMs: number; label: string }[];
}

type Points = [number, number | null][];

/** Series in the person's units: levels in m or ft, air temperature in °C or °F. */
function inDisplayUnits(trend: TrendData, marks: TrendMarks, fig: Figures): { trend: TrendData; marks: TrendMarks } {
  const map = (points: Points, f: (v: number) => number): Points => points.map(([t, v]) => [t, v == null ? null : f(v)]);
  const L = fig.levelFromSi;
  return {
    trend: { ...trend, compensated: map(trend.compensated, L), raw: map(trend.raw, L), bandLow: map(trend.bandLow, L), bandWidth: map(trend.bandWidth, L), temperature: map(trend.temperature, fig.temperatureFromSi) },
    marks: { ...marks, forecast: marks.forecast.map(([t, v]) => [t, L(v)]), dips: marks.dips.map((d) => ({ ...d, levelM: L(d.levelM) })) },
  };
}

export function trendOption(siTrend: TrendData, siMarks: TrendMarks, window: { fromMs: number; toMs: number }, time: TimeDisplay, fig: Figures): EChartsOption {
  const { trend, marks } = inDisplayUnits(siTrend, siMarks, fig);
  const label = trend.quantity === "level" ? "Level" : "Distance";
  const endMs = Math.max(window.toMs, marks.forecast.length ? marks.forecast[marks.forecast.length - 1][0] : 0);
  const hasTemperature = trend.temperature.some(([, v]) => v != null);
  const hasRaw = trend.raw.some(([, v]) => v != null);
  const hasBand = trend.bandWidth.some(([, v]) => v != null);
  return {
    animation: false,
    aria: { enabled: true },
    textStyle: { fontFamily: "inherit", color: INK },
    grid: { left: 64, right: hasTemperature ? 110 : 80, top: 24, bottom: 72 },
    // Without a fixed icon the legend draws each line as it is (solid, dashed, dotted): not by colour alone.
    legend: { bottom: 0, textStyle: { color: INK } },
    tooltip: {
      trigger: "axis",
      axisPointer: { label: { formatter: (p) => (typeof p.value === "number" ? formatDateTime(p.value, time) : String(p.value)) } },
      valueFormatter: (v) => (typeof v === "number" ? fig.number(v, 3) : String(v ?? "—")),
    },
    xAxis: {
      type: "time",
      min: window.fromMs,
      max: endMs,
      name: axisZoneTitle(window.fromMs, endMs, time),
      nameLocation: "middle",
      nameGap: 28,
      nameTextStyle: { color: MUTED },
      axisLine: { lineStyle: { color: RULE } },
      axisLabel: { color: MUTED, hideOverlap: true, formatter: (v: number) => formatAxisLabel(v, time, endMs - window.fromMs) },
      splitLine: { show: false },
    },
    yAxis: [
      { type: "value", name: `${label} (${fig.levelSymbol})`, nameTextStyle: { color: MUTED }, scale: true, axisLabel: { color: MUTED, formatter: (v: number) => fig.number(v, 2) }, splitLine: { lineStyle: { color: RULE } } },
      ...(hasTemperature
        ? [{ type: "value" as const, name: `Air (${fig.temperatureSymbol})`, nameTextStyle: { color: MUTED }, scale: true, position: "right" as const, offset: 36, axisLabel: { color: MUTED, formatter: (v: number) => v.toFixed(0) }, splitLine: { show: false } }]
        : []),
    ],
    series: [
      ...(hasBand
        ? [
            { name: "band-base", type: "line" as const, data: trend.bandLow, stack: "band", symbol: "none", lineStyle: { opacity: 0 }, tooltip: { show: false }, silent: true, connectNulls: false },
            {
              name: "Uncertainty",
              type: "line" as const,
              data: trend.bandWidth,
              stack: "band",
              symbol: "none",
              lineStyle: { opacity: 0 },
              areaStyle: { color: INK, opacity: 0.14 },
              itemStyle: { color: "rgba(31, 42, 48, 0.3)" },
              tooltip: { show: false },
              silent: true,
            },
          ]
        : []),
      ...(hasRaw ? [{ name: "Raw (uncompensated)", type: "line" as const, data: trend.raw, symbol: "none", lineStyle: { color: MUTED, width: 1, type: "dashed" as const }, itemStyle: { color: MUTED } }] : []),
      {
        name: "Compensated",
        type: "line",
        data: trend.compensated,
        symbol: "none",
        lineStyle: { color: INK, width: 1.2 },
        itemStyle: { color: INK },
        markLine: {
          symbol: "none",
          silent: true,
          data: [
            ...marks.setpoints.map((s) => ({
              yAxis: fig.levelFromSi(s.value_m),
              lineStyle: { color: INK, type: "dashed" as const, width: 1 },
              label: { position: "end" as const, formatter: `${s.key.toUpperCase()} ${fig.length(s.value_m)}`, color: INK },
            })),
            ...marks.calibrations.map((c) => ({
              xAxis: c.atMs,
              lineStyle: { color: MUTED, type: "dotted" as const, width: 1 },
              label: { position: "insideEndTop" as const, formatter: c.label, color: MUTED },
            })),
          ],
        },
      },
      ...(marks.forecast.length
        ? [
            {
              name: "Forecast",
              type: "line" as const,
              data: marks.forecast,
              symbol: "none",
              lineStyle: { color: INK, width: 1.2, type: "dotted" as const },
              itemStyle: { color: INK },
              // Above the line's end, right-aligned, so it stays inside the plot.
              endLabel: { show: true, color: INK, align: "right" as const, offset: [0, -14] as [number, number], formatter: () => `Reorder ${formatDate(marks.forecast[marks.forecast.length - 1][0], time)}` },
            },
          ]
        : []),
      ...(marks.dips.length
        ? [
            {
              name: "Manual dip",
              type: "scatter" as const,
              data: marks.dips.map((d) => ({ value: [d.atMs, d.levelM], name: d.label })),
              symbol: "emptyCircle",
              symbolSize: 9,
              itemStyle: { color: INK, borderWidth: 2 },
            },
          ]
        : []),
      ...(hasTemperature
        ? [{ name: "Air temperature", type: "line" as const, yAxisIndex: 1, data: trend.temperature, symbol: "none", lineStyle: { color: LIQUID, width: 1 }, itemStyle: { color: LIQUID } }]
        : []),
    ],
  };
}

export function LevelTrend({ trend, marks, fromMs, toMs, description, timeZone }: { trend: TrendData; marks: TrendMarks; fromMs: number; toMs: number; description: string; timeZone: string }) {
  const option = trendOption(trend, marks, { fromMs, toMs }, useTimeDisplay(timeZone), useFigures());
  // The legend's "band-base" is the band's invisible floor; hide it from the legend.
  const legend = { ...(option.legend as object), data: (option.series as { name: string }[]).map((s) => s.name).filter((n) => n !== "band-base") };
  return (
    <figure className="m-0">
      <div role="img" aria-label={description} data-testid="level-trend">
        <ReactECharts option={{ ...option, legend }} notMerge style={{ height: 360, width: "100%" }} opts={{ renderer: "svg" }} />
      </div>
      <figcaption className="sr-only">{description}</figcaption>
    </figure>
  );
}
