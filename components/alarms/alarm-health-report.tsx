"use client";

import useSWR from "swr";
import { createColumnHelper } from "@tanstack/react-table";
import { swrFetcher } from "@/lib/fetcher";
import { alarmHealthQuerySchema } from "@/lib/validations/alarm";
import type { BenchmarkedMetric, BenchmarkVerdict } from "@/lib/alarms/alarm-health";
import type { AlarmPriority } from "@/lib/alarms/state-machine";
import type { AlarmHealthJson } from "@/lib/read-models/alarm-health";
import { Loading, LoadError } from "@/components/ui/data-state";
import { SiteTime, useTimeDisplay } from "@/components/ui/site-time";
import { formatDateTime, formatTime } from "@/lib/format/time";
import { DataTable } from "@/components/ui/data-table";
import { useListParams } from "@/components/ui/list-params";
import { ClearFilters } from "@/components/ui/clear-filters";
import { SiteFilter, useSites } from "@/components/ui/site-filter";

const METRICS: { key: keyof AlarmHealthJson["metrics"]; label: string }[] = [
  { key: "averagePer10Min", label: "Alarms per 10 min, average" },
  { key: "averagePerHour", label: "Alarms per hour, average" },
  { key: "peakPer10Min", label: "Most alarms in any 10 min" },
  { key: "averagePerDay", label: "Alarms per day, average" },
  { key: "averagePerDayIec", label: "Alarms per day, average (IEC figure)" },
  { key: "timeInFloodPct", label: "Time in flood" },
  { key: "chatteringAlarms", label: "Chattering alarms" },
  { key: "staleMaxPerDay", label: "Stale alarms on the worst day" },
  { key: "top10SharePct", label: "Share of the 10 most frequent alarms" },
  { key: "priorityLowPct", label: "Low priority share" },
  { key: "priorityMediumPct", label: "Medium priority share" },
  { key: "priorityHighPct", label: "High and critical priority share" },
];

const VERDICT: Record<BenchmarkVerdict, { text: string; className: string }> = {
  within: { text: "Within", className: "" },
  manageable: { text: "Manageable", className: "font-bold text-medium" },
  exceeds: { text: "Beyond", className: "font-bold text-high" },
  no_data: { text: "No data", className: "text-muted" },
};

function figure(m: BenchmarkedMetric): string {
  if (m.value === null) return "—";
  if (Number.isInteger(m.value)) return `${m.value} ${m.benchmark.unit}`;
  // Small rates keep two significant figures rather than rounding to zero.
  const text = m.value < 0.01 ? m.value.toPrecision(2) : m.value.toFixed(m.value < 10 ? 2 : 1);
  return `${text} ${m.benchmark.unit}`;
}

const FILTERS = ["from", "to", "site_id"] as const;
/** The period's ends are calendar days in the URL (the date boxes' values); the API takes instants. */
const day = (v?: string) => (v && /^\d{4}-\d{2}-\d{2}$/.test(v) ? v : "");

type Metric = (typeof METRICS)[number] & { m: BenchmarkedMetric };
type Report = AlarmHealthJson;
const metricColumn = createColumnHelper<Metric>();
const metricColumns = [
  metricColumn.accessor("label", { header: "Measure" }),
  metricColumn.display({ id: "value", header: "This period", cell: (c) => figure(c.row.original.m), meta: { cellClassName: "figures whitespace-nowrap" } }),
  metricColumn.display({ id: "benchmark", header: "Benchmark", cell: (c) => c.row.original.m.benchmark.text }),
  metricColumn.display({ id: "verdict", header: "Verdict", cell: (c) => <span className={VERDICT[c.row.original.m.verdict].className}>{VERDICT[c.row.original.m.verdict].text}</span> }),
  metricColumn.display({ id: "source", header: "Source", cell: (c) => c.row.original.m.source, meta: { cellClassName: "text-xs text-muted" } }),
];

type Top = Report["top10"][number];
type Chattering = Report["chattering"][number];
type Stale = Report["stale"][number];
const topColumn = createColumnHelper<Top>();
const chatterColumn = createColumnHelper<Chattering>();
const staleColumn = createColumnHelper<Stale>();
const priorityColumn = createColumnHelper<{ priority: AlarmPriority; count: number }>();
const priorityColumns = [
  priorityColumn.accessor("priority", { header: "Priority", meta: { cellClassName: "capitalize" } }),
  priorityColumn.accessor("count", { header: "Activations", meta: { cellClassName: "figures" } }),
];

/** The alarm system's performance over a period, each figure beside its ISA-18.2 / EEMUA 191 benchmark. */
export function AlarmHealthReport() {
  const list = useListParams(alarmHealthQuerySchema, FILTERS, FILTERS);
  const from = day(list.values.from);
  const to = day(list.values.to);
  const siteId = list.values.site_id ?? "";
  const q = new URLSearchParams();
  if (from) q.set("from", new Date(`${from}T00:00:00`).toISOString());
  if (to) q.set("to", new Date(new Date(`${to}T00:00:00`).getTime() + 86_400_000).toISOString());
  if (siteId) q.set("site_id", siteId);
  const { data, error, isLoading, mutate } = useSWR<AlarmHealthJson>(`/api/alarm-health?${q.toString()}`, swrFetcher, { keepPreviousData: true });
  const sites = useSites();
  // One site chosen: its clock; all sites: the viewer's.
  const zone = sites.data?.items.find((s) => s.id === siteId)?.time_zone ?? null;
  const time = useTimeDisplay(zone);

  const label = (key: string) => data?.alarm_labels[key] ?? key;

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end gap-4" role="group" aria-label="Period">
        <div>
          <label htmlFor="health-from" className="label">From</label>
          <input id="health-from" type="date" className="field figures" value={from} onChange={(e) => list.set({ from: e.target.value })} />
        </div>
        <div>
          <label htmlFor="health-to" className="label">To (inclusive)</label>
          <input id="health-to" type="date" className="field figures" value={to} onChange={(e) => list.set({ to: e.target.value })} />
        </div>
        <SiteFilter id="health-site" className="field" value={siteId} onChange={(v) => list.set({ site_id: v })} />
        <ClearFilters filtered={list.filtered} onClear={list.clearFilters} />
      </div>

      {isLoading && !data && <Loading />}
      {error && <LoadError error={error} retry={() => mutate()} />}
      {data && (
        <>
          <p className="text-sm">
            <span className="figures">{data.totalActivations}</span> activations from <SiteTime at={data.from} zone={zone} className="figures" /> to{" "}
            <SiteTime at={data.to} zone={zone} className="figures" /> (<span className="figures">{data.periodDays.toFixed(1)}</span> days).
            {!data.periodLongEnough && <span className="font-bold"> The benchmarks are stated over 30 days or more; read a shorter period as a trend only.</span>}
            {" "}The benchmarks are per operator position: choose the sites one desk or team looks after.
          </p>

          <DataTable
            data={METRICS.map((metric) => ({ ...metric, m: data.metrics[metric.key] }))}
            columns={metricColumns}
            getRowId={(r) => r.key}
            sortable={false}
            label="Against the benchmarks"
            title
            empty="No measures."
            rowProps={(row) => ({ "data-metric": row.original.key })}
          />

          <div className="grid gap-6 lg:grid-cols-2">
            <DataTable
              data={data.top10}
              columns={[
                topColumn.accessor((t) => label(t.alarmKey), { id: "alarm", header: "Alarm" }),
                topColumn.accessor("count", { header: "Activations", meta: { cellClassName: "figures" } }),
                topColumn.accessor("sharePct", { header: "Share", cell: (c) => `${c.getValue().toFixed(1)} %`, meta: { cellClassName: "figures whitespace-nowrap" } }),
              ]}
              getRowId={(t) => t.alarmKey}
              label="The 10 most frequent alarms"
              title
              empty="No activations in this period."
            />
            <DataTable
              data={(["critical", "high", "medium", "low"] as const).map((priority) => ({ priority, count: data.priorityCounts[priority] }))}
              columns={priorityColumns}
              getRowId={(p) => p.priority}
              sortable={false}
              label="Priority mix and floods"
              title
              empty="No activations in this period."
              footer={
                <p className="px-3 py-3 text-sm">
                  {data.floods.length === 0
                    ? "No floods (more than 10 alarms in 10 min) in this period."
                    : `${data.floods.length} flood${data.floods.length > 1 ? "s" : ""}: ${data.floods.map((f) => `${formatDateTime(f.start, time)} to ${formatTime(f.end, time)} (${f.alarmCount} alarms, peak ${f.peakPer10Min} in 10 min)`).join("; ")}.`}
                </p>
              }
            />
            <DataTable
              data={data.chattering}
              columns={[
                chatterColumn.accessor((c) => label(c.alarmKey), { id: "alarm", header: "Alarm" }),
                chatterColumn.accessor("maxPerMinute", { header: "Most in 1 min", meta: { cellClassName: "figures" } }),
                chatterColumn.accessor("activations", { header: "Activations", meta: { cellClassName: "figures" } }),
              ]}
              getRowId={(c) => c.alarmKey}
              label="Chattering alarms"
              title
              empty="None: no alarm activated 3 or more times within a minute."
            />
            <DataTable
              data={data.stale.slice(0, 20)}
              columns={[
                staleColumn.accessor((s) => label(s.alarmKey), { id: "alarm", header: "Alarm", cell: (c) => <>{c.getValue()}{c.row.original.stillActive && <span className="text-muted"> (still active)</span>}</> }),
                staleColumn.accessor((s) => Date.parse(s.activeSince), { id: "since", header: "Active since", cell: (c) => <SiteTime at={c.row.original.activeSince} zone={zone} />, meta: { cellClassName: "figures" } }),
                staleColumn.accessor("activeHours", { header: "Hours", cell: (c) => `${c.getValue().toFixed(1)} h`, meta: { cellClassName: "figures" } }),
              ]}
              getRowId={(s) => `${s.alarmKey}-${s.activeSince}`}
              label="Stale alarms (active over 24 h)"
              title
              empty="None."
            />
          </div>
        </>
      )}
    </div>
  );
}
