"use client";

import { useEffect, useRef } from "react";
import * as echarts from "echarts/core";
import { LineChart, ScatterChart } from "echarts/charts";
import { GridComponent, LegendComponent, TooltipComponent } from "echarts/components";
import { useTimeDisplay } from "@/components/ui/site-time";
import { axisZoneTitle, formatAxisLabel } from "@/lib/format/time";
import { SVGRenderer } from "echarts/renderers";

echarts.use([LineChart, ScatterChart, GridComponent, LegendComponent, TooltipComponent, SVGRenderer]);

// Halftrip's trend look (LOOK.md): the level as it would be after calibration is the thin ink line,
// the level as it is now a dashed muted line, dips as points; no gradients.
const INK = "#1f2a30";
const MUTED = "#6b7275";
const RULE = "#d9d6cc";

export interface CalibrationTrendProps {
  series: { at: string; level_now_m: number; level_after_m: number }[];
  dips: { at: string; level_m: number }[];
  zone: string;
}

export function CalibrationTrend({ series, dips, zone }: CalibrationTrendProps) {
  const ref = useRef<HTMLDivElement>(null);
  const time = useTimeDisplay(zone);
  useEffect(() => {
    if (!ref.current) return;
    const chart = echarts.init(ref.current, undefined, { renderer: "svg" });
    const times = [...series, ...dips].map((p) => Date.parse(p.at));
    const fromMs = Math.min(...times);
    const toMs = Math.max(...times);
    chart.setOption({
      animation: false,
      grid: { left: 56, right: 16, top: 32, bottom: 56 },
      legend: { top: 0, textStyle: { color: INK }, data: ["After calibration", "As measured now", "Dips"] },
      tooltip: { trigger: "axis", valueFormatter: (v: unknown) => (typeof v === "number" ? `${v.toFixed(3)} m` : String(v)) },
      xAxis: {
        type: "time",
        name: axisZoneTitle(fromMs, toMs, time),
        nameLocation: "middle",
        nameGap: 28,
        nameTextStyle: { color: MUTED },
        axisLine: { lineStyle: { color: RULE } },
        axisLabel: { color: MUTED, hideOverlap: true, formatter: (v: number) => formatAxisLabel(v, time, toMs - fromMs) },
        splitLine: { show: false },
      },
      yAxis: { type: "value", name: "level (m)", scale: true, axisLabel: { color: MUTED }, nameTextStyle: { color: MUTED }, splitLine: { lineStyle: { color: RULE } } },
      series: [
        { name: "After calibration", type: "line", showSymbol: false, lineStyle: { color: INK, width: 1.5 }, itemStyle: { color: INK }, data: series.map((s) => [s.at, s.level_after_m]) },
        { name: "As measured now", type: "line", showSymbol: false, lineStyle: { color: MUTED, width: 1, type: "dashed" }, itemStyle: { color: MUTED }, data: series.map((s) => [s.at, s.level_now_m]) },
        { name: "Dips", type: "scatter", symbol: "diamond", symbolSize: 10, itemStyle: { color: "#ffffff", borderColor: INK, borderWidth: 2 }, data: dips.map((d) => [d.at, d.level_m]) },
      ],
    });
    const resize = new ResizeObserver(() => chart.resize());
    resize.observe(ref.current);
    return () => {
      resize.disconnect();
      chart.dispose();
    };
  }, [series, dips, time]);
  return (
    <figure>
      <div ref={ref} className="h-64 w-full" role="img" aria-label="Level as measured now (dashed) and after the calibration (solid), with the dips as diamonds" />
      <figcaption className="mt-1 text-xs text-muted">Solid: after calibration. Dashed: as measured now. Diamonds: the dips used.</figcaption>
    </figure>
  );
}
