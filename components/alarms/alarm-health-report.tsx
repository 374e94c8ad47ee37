"use client";

import useSWR from "swr";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { swrFetcher } from "@/lib/fetcher";
import { isUuid } from "@/lib/validations/common";
import type { BenchmarkedMetric, BenchmarkVerdict } from "@/lib/alarms/alarm-health";
import type { AlarmHealthJson } from "@/lib/read-models/alarm-health";
import type { SiteJson } from "@/lib/services/sites";
import { Loading, LoadError } from "@/components/ui/data-state";
import { SiteTime, useTimeDisplay } from "@/components/ui/site-time";
import { formatDateTime, formatTime } from "@/lib/format/time";
import { STACKED_TABLE } from "@/components/ui/form-fields";

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

function dateParam(params: URLSearchParams, key: string): string {
  const v = params.get(key) ?? "";
  return /^\d{4}-\d{2}-\d{2}$/.test(v) ? v : "";
}

/** The alarm system's performance over a period, each figure beside its ISA-18.2 / EEMUA 191 benchmark. */
export function AlarmHealthReport() {
  const router = useRouter();
  const pathname = usePathname();
  const params = useSearchParams();
  const search = new URLSearchParams(params.toString());
  const from = dateParam(search, "from");
  const to = dateParam(search, "to");
  const siteId = isUuid(search.get("site_id") ?? "") ? (search.get("site_id") as string) : "";
  const q = new URLSearchParams();
  if (from) q.set("from", new Date(`${from}T00:00:00`).toISOString());
  if (to) q.set("to", new Date(new Date(`${to}T00:00:00`).getTime() + 86_400_000).toISOString());
  if (siteId) q.set("site_id", siteId);
  const { data, error, isLoading, mutate } = useSWR<AlarmHealthJson>(`/api/alarm-health?${q.toString()}`, swrFetcher, { keepPreviousData: true });
  const sites = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  // One site chosen: its clock; all sites: the viewer's.
  const zone = sites.data?.items.find((s) => s.id === siteId)?.time_zone ?? null;
  const time = useTimeDisplay(zone);

  function setParam(key: string, value: string) {
    const next = new URLSearchParams(params.toString());
    if (value) next.set(key, value);
    else next.delete(key);
    const qs = next.toString();
    router.replace(qs ? `${pathname}?${qs}` : pathname, { scroll: false });
  }
  const label = (key: string) => data?.alarm_labels[key] ?? key;

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end gap-4" role="group" aria-label="Period">
        <div>
          <label htmlFor="health-from" className="label">From</label>
          <input id="health-from" type="date" className="field figures" value={from} onChange={(e) => setParam("from", e.target.value)} />
        </div>
        <div>
          <label htmlFor="health-to" className="label">To (inclusive)</label>
          <input id="health-to" type="date" className="field figures" value={to} onChange={(e) => setParam("to", e.target.value)} />
        </div>
        <div>
          <label htmlFor="health-site" className="label">Site</label>
          <select id="health-site" className="field" value={siteId} onChange={(e) => setParam("site_id", e.target.value)}>
            <option value="">All sites</option>
            {sites.data?.items.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        </div>
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

          <section className="card overflow-x-auto" aria-labelledby="health-metrics-title">
            <h2 id="health-metrics-title" className="px-3 pt-3 text-lg font-bold">Against the benchmarks</h2>
            <table className={STACKED_TABLE}>
              <thead>
                <tr><th scope="col">Measure</th><th scope="col">This period</th><th scope="col">Benchmark</th><th scope="col">Verdict</th><th scope="col">Source</th></tr>
              </thead>
              <tbody>
                {METRICS.map(({ key, label: text }) => {
                  const m = data.metrics[key];
                  const v = VERDICT[m.verdict];
                  return (
                    <tr key={key} data-metric={key}>
                      <td data-label="Measure">{text}</td>
                      <td data-label="This period" className="figures whitespace-nowrap">{figure(m)}</td>
                      <td data-label="Benchmark">{m.benchmark.text}</td>
                      <td data-label="Verdict" className={v.className}>{v.text}</td>
                      <td data-label="Source" className="text-xs text-muted">{m.source}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </section>

          <div className="grid gap-6 lg:grid-cols-2">
            <section className="card overflow-x-auto" aria-labelledby="health-top-title">
              <h2 id="health-top-title" className="px-3 pt-3 text-lg font-bold">The 10 most frequent alarms</h2>
              {data.top10.length === 0 ? <p className="px-3 py-4 text-sm text-muted">No activations in this period.</p> : (
                <table className={STACKED_TABLE}>
                  <thead><tr><th scope="col">Alarm</th><th scope="col">Activations</th><th scope="col">Share</th></tr></thead>
                  <tbody>
                    {data.top10.map((t) => (
                      <tr key={t.alarmKey}>
                        <td data-label="Alarm">{label(t.alarmKey)}</td>
                        <td data-label="Activations" className="figures">{t.count}</td>
                        <td data-label="Share" className="figures whitespace-nowrap">{t.sharePct.toFixed(1)} %</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              )}
            </section>
            <section className="card overflow-x-auto" aria-labelledby="health-mix-title">
              <h2 id="health-mix-title" className="px-3 pt-3 text-lg font-bold">Priority mix and floods</h2>
              <table className={STACKED_TABLE}>
                <thead><tr><th scope="col">Priority</th><th scope="col">Activations</th></tr></thead>
                <tbody>
                  {(["critical", "high", "medium", "low"] as const).map((p) => (
                    <tr key={p}><td data-label="Priority" className="capitalize">{p}</td><td data-label="Activations" className="figures">{data.priorityCounts[p]}</td></tr>
                  ))}
                </tbody>
              </table>
              <p className="px-3 py-3 text-sm">
                {data.floods.length === 0
                  ? "No floods (more than 10 alarms in 10 min) in this period."
                  : `${data.floods.length} flood${data.floods.length > 1 ? "s" : ""}: ${data.floods.map((f) => `${formatDateTime(f.start, time)} to ${formatTime(f.end, time)} (${f.alarmCount} alarms, peak ${f.peakPer10Min} in 10 min)`).join("; ")}.`}
              </p>
            </section>
            <section className="card overflow-x-auto" aria-labelledby="health-chatter-title">
              <h2 id="health-chatter-title" className="px-3 pt-3 text-lg font-bold">Chattering alarms</h2>
              {data.chattering.length === 0 ? <p className="px-3 py-4 text-sm text-muted">None: no alarm activated 3 or more times within a minute.</p> : (
                <table className={STACKED_TABLE}>
                  <thead><tr><th scope="col">Alarm</th><th scope="col">Most in 1 min</th><th scope="col">Activations</th></tr></thead>
                  <tbody>
                    {data.chattering.map((c) => (
                      <tr key={c.alarmKey}><td data-label="Alarm">{label(c.alarmKey)}</td><td data-label="Most in 1 min" className="figures">{c.maxPerMinute}</td><td data-label="Activations" className="figures">{c.activations}</td></tr>
                    ))}
                  </tbody>
                </table>
              )}
            </section>
            <section className="card overflow-x-auto" aria-labelledby="health-stale-title">
              <h2 id="health-stale-title" className="px-3 pt-3 text-lg font-bold">Stale alarms (active over 24 h)</h2>
              {data.stale.length === 0 ? <p className="px-3 py-4 text-sm text-muted">None.</p> : (
                <table className={STACKED_TABLE}>
                  <thead><tr><th scope="col">Alarm</th><th scope="col">Active since</th><th scope="col">Hours</th></tr></thead>
                  <tbody>
                    {data.stale.slice(0, 20).map((s) => (
                      <tr key={`${s.alarmKey}-${s.activeSince}`}>
                        <td data-label="Alarm">{label(s.alarmKey)}{s.stillActive && <span className="text-muted"> (still active)</span>}</td>
                        <td data-label="Active since" className="figures"><SiteTime at={s.activeSince} zone={zone} /></td>
                        <td data-label="Hours" className="figures">{s.activeHours.toFixed(1)} h</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              )}
            </section>
          </div>
        </>
      )}
    </div>
  );
}
