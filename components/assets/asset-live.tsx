"use client";

import Link from "next/link";
import { useSearchParams } from "next/navigation";
import useSWR from "swr";
import type { AssetOverviewJson } from "@/lib/read-models/overview-asset";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import { PLAN_LABELS, TankPlanVerdict } from "@/components/assets/tank-plan";
import { buildTrend, forecastLine, sourceForPeriod, type ChannelCalibration, type SeriesPoint } from "@/components/assets/asset-live-series";
import { AlarmHistory, CalibrationList, DipList, FlagHistory } from "@/components/assets/asset-live-history";
import { periodFromParams, RangePicker, windowOf, type Period } from "@/components/assets/asset-live-range";
import { Loading, LoadError } from "@/components/ui/data-state";
import { FleetAlarmList } from "@/components/alarms/fleet-alarm-list";
import { formatDuration } from "@/components/fleet/fleet-figures";
import { useFigures } from "@/components/ui/display-settings";
import { LIVE_REFRESH_MS } from "@/components/fleet/fleet-overview";
import { FlagTag, OverdueAge, TankCaution, type Priority } from "@/components/fleet/fleet-status";
import { LevelTrend } from "@/components/assets/level-trend";
import { useTimeDisplay } from "@/components/ui/site-time";
import { formatDateTime } from "@/lib/format/time";
import { SoundingStrip } from "@/components/assets/sounding-strip";

// The asset screen: what is wrong (alarms, open sensor flags), what it is now, and how it got here
// (the trend for the chosen period, alarm history, flags, dips and calibration changes).

const SERIES_REFRESH_MS = 30_000;
const MAX_RAW_POINTS = 10_000;

type Overview = AssetOverviewJson;

interface MeasurementItem {
  at: string;
  status: string;
  tof_us: number | null;
  air_temp_c: number | null;
  speed_of_sound_ms: number | null;
  distance_m: number | null;
  level_m: number | null;
  uncertainty_m: number | null;
}

// The series route's column-wise answer, with only the figures the trend draws.
const ROLLUP_FIELDS = "distance_m,level_m,air_temp_c,uncertainty_m";
interface RollupColumns {
  at: number[];
  distance_m: (number | null)[];
  level_m: (number | null)[];
  air_temp_c: (number | null)[];
  uncertainty_m: (number | null)[];
}

const query = (w: { fromMs: number; toMs: number }) => `from=${encodeURIComponent(new Date(w.fromMs).toISOString())}&to=${encodeURIComponent(new Date(w.toMs).toISOString())}`;

/** The period's series: raw measurements of the asset's channel up to a day, the asset's rollups beyond. */
async function fetchSeries(assetId: string, channelId: string, period: Period, compensated: boolean): Promise<{ points: SeriesPoint[]; fromMs: number; toMs: number; source: string }> {
  const w = windowOf(period);
  const source = sourceForPeriod(w.fromMs, w.toMs);
  if (source.kind === "raw") {
    const body = await fetchJson<{ items: MeasurementItem[] }>(`/api/channels/${channelId}/measurements?${query(w)}&limit=${MAX_RAW_POINTS}`);
    const points = body.items
      .filter((m) => m.status === "ok")
      .map((m) => ({ atMs: Date.parse(m.at), distanceM: m.distance_m, levelM: m.level_m, airTempC: m.air_temp_c, speedMs: m.speed_of_sound_ms, uncertaintyM: m.uncertainty_m, compensated: compensated && m.tof_us != null }));
    return { points, ...w, source: "each measurement" };
  }
  const { columns: c } = await fetchJson<{ columns: RollupColumns }>(`/api/assets/${assetId}/series?${query(w)}&bucket=${source.bucket}&fields=${ROLLUP_FIELDS}`);
  const points = c.at.map((atMs, i) => ({ atMs, distanceM: c.distance_m[i], levelM: c.level_m[i], airTempC: c.air_temp_c[i], speedMs: null, uncertaintyM: c.uncertainty_m[i], compensated }));
  return { points, ...w, source: source.bucket === "5m" ? "5-minute means" : "hourly means" };
}

function NowPanel({ o, now }: { o: Overview; now: number }) {
  const fig = useFigures();
  const s = o.state;
  const latest = s?.latest ?? null;
  const expected = s?.channel?.expected_interval_s;
  if (o.asset.kind === "tank") {
    const setpointAlarm = new Map(o.alarms.filter((a) => ["hh", "h", "l", "ll"].includes(a.kind)).map((a) => [a.kind, a.priority as Priority]));
    return (
      <div className="flex flex-wrap gap-6">
        <SoundingStrip
          name={o.asset.name}
          heightM={o.asset.tank_height_m ?? o.asset.mount_height_m ?? 1}
          levelM={latest?.level_m ?? null}
          uncertaintyM={latest?.uncertainty_m}
          setpoints={o.setpoints.filter((p) => p.enabled).map((p) => ({ key: p.key, value_m: p.value_m, alarm: setpointAlarm.get(p.key) ?? null }))}
        />
        <dl className="grid grid-cols-[auto_1fr] content-start gap-x-4 gap-y-1 text-sm">
          <dt className="text-muted">Level</dt>
          <dd className="figures" data-testid="asset-level">{fig.length(latest?.level_m, latest?.uncertainty_m)}<OverdueAge at={latest?.at} expectedIntervalS={expected} now={now} /></dd>
          <dt className="text-muted">Fill</dt>
          <dd className="figures">{fig.percent(latest?.fill_pct)}</dd>
          <dt className="text-muted">Volume</dt>
          <dd className="figures">{fig.volume(latest?.volume_l)}{o.asset.capacity_l != null && <span className="text-muted"> of {fig.volume(o.asset.capacity_l)}</span>}</dd>
          <dt className="text-muted">Ullage to safe fill</dt>
          <dd className="figures">
            {latest?.volume_l != null && o.asset.capacity_l != null && o.asset.safe_fill_pct != null ? fig.volume(Math.max(0, (o.asset.capacity_l * o.asset.safe_fill_pct) / 100 - latest.volume_l)) : "—"}
          </dd>
          <dt className="text-muted">{s?.plan ? PLAN_LABELS[s.plan.purpose] : "Plan"}</dt>
          <dd><TankPlanVerdict plan={s?.plan ?? null} zone={o.asset.site_time_zone} detail /></dd>
        </dl>
      </div>
    );
  }
  const occupancy = s?.occupancy;
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
      {o.asset.kind === "bay" && (
        <>
          <dt className="text-muted">State</dt>
          <dd className="font-bold" data-testid="bay-state">
            {occupancy ? (occupancy.occupied ? "Occupied" : "Free") : "No reading"}
            {occupancy?.since && <span className="figures font-normal"> for {formatDuration((now - new Date(occupancy.since).getTime()) / 1000)}</span>}
          </dd>
        </>
      )}
      <dt className="text-muted">Distance</dt>
      <dd className="figures">{fig.length(latest?.distance_m, latest?.uncertainty_m)}<OverdueAge at={latest?.at} expectedIntervalS={expected} now={now} /></dd>
      {o.asset.kind === "bay" && (
        <>
          <dt className="text-muted">Floor / occupied below</dt>
          <dd className="figures">{fig.length(o.asset.floor_distance_m)} / {fig.length(o.asset.occupied_below_m)}</dd>
        </>
      )}
    </dl>
  );
}

function Trend({ o, period }: { o: Overview; period: Period }) {
  const channel = o.channels[0];
  // Units that time an echo are compensated for the air temperature; pulse- and duty-coded ones compensate themselves.
  const compensated = channel ? channel.device_profile === "echo" || channel.device_profile === "capture" : false;
  const key = channel ? ["asset-series", o.asset.id, channel.id, JSON.stringify(period)] : null;
  const time = useTimeDisplay(o.asset.site_time_zone);
  const fig = useFigures();
  const series = useSWR(key, () => fetchSeries(o.asset.id, channel.id, period, compensated), { refreshInterval: period.kind === "relative" ? SERIES_REFRESH_MS : 0, keepPreviousData: true });
  if (!channel) return <p className="text-sm text-muted">No channel measures this asset yet; a device must be assigned to it first.</p>;
  if (series.isLoading && !series.data) return <Loading label="Loading the trend…" />;
  if (series.error && !series.data) return <LoadError error={series.error} retry={() => series.mutate()} />;
  if (!series.data) return null;
  const calibration: ChannelCalibration = { offsetM: channel.calibration_offset_m, scale: channel.calibration_scale, faceOffsetM: channel.face_offset_m };
  const isTank = o.asset.kind === "tank";
  const trend = buildTrend(series.data.points, { quantity: isTank ? "level" : "distance", mountHeightM: o.asset.mount_height_m, calibration });
  const latest = o.state?.latest;
  const forecast =
    isTank && o.asset.geometry && latest?.volume_l != null && o.state?.plan?.purpose === "supply" && o.state.plan.due_at && o.asset.capacity_l != null && o.asset.reorder_pct != null
      ? forecastLine({ geometry: o.asset.geometry, volumeNowL: latest.volume_l, reorderVolumeL: (o.asset.capacity_l * o.asset.reorder_pct) / 100, nowMs: Date.parse(latest.at), reorderAtMs: Date.parse(o.state.plan.due_at) })
      : [];
  const marks = {
    setpoints: isTank ? o.setpoints.filter((s) => s.enabled).map((s) => ({ key: s.key, value_m: s.value_m })) : [],
    forecast: period.kind === "relative" ? forecast : [],
    dips: o.dips.map((d) => ({ atMs: Date.parse(d.at), levelM: d.level_m, label: `Dip ${fig.length(d.level_m)}` })),
    calibrations: o.calibrations.map((c) => ({ atMs: Date.parse(c.at), label: "Calibration" })),
  };
  const n = trend.compensated.filter(([, v]) => v != null).length;
  const description = `${isTank ? "Level" : "Distance"} of ${o.asset.name} from ${formatDateTime(series.data.fromMs, time)} to ${formatDateTime(series.data.toMs, time)}, ${n} points (${series.data.source})${marks.setpoints.length ? `; setpoints ${marks.setpoints.map((s) => `${s.key.toUpperCase()} ${fig.length(s.value_m)}`).join(", ")}` : ""}${marks.dips.length ? `; ${marks.dips.length} manual dips` : ""}${marks.calibrations.length ? `; ${marks.calibrations.length} calibration changes` : ""}.`;
  return (
    <>
      {n === 0 ? (
        <p className="py-6 text-sm text-muted">No valid measurement in this period.</p>
      ) : (
        <LevelTrend trend={trend} marks={marks} fromMs={series.data.fromMs} toMs={series.data.toMs} description={description} timeZone={o.asset.site_time_zone} />
      )}
      <p className="mt-1 text-xs text-muted">
        From {series.data.source}. Raw is what a unit without temperature compensation would report (a fixed speed of sound for 20 °C).
        {series.error && <span role="alert" className="ml-2 font-bold text-critical">The last refresh failed: {series.error.message}</span>}
      </p>
    </>
  );
}

export function AssetLive({ assetId, canAcknowledge }: { assetId: string; canAcknowledge: boolean }) {
  const params = useSearchParams();
  const period = periodFromParams(new URLSearchParams(params.toString()));
  const overviewKey = ["asset-overview", assetId, JSON.stringify(period)];
  const { data, error, isLoading, mutate } = useSWR<Overview>(overviewKey, () => swrFetcher<Overview>(`/api/assets/${assetId}/overview?${query(windowOf(period))}`), {
    refreshInterval: LIVE_REFRESH_MS,
    keepPreviousData: true,
  });
  if (isLoading && !data) return <Loading label="Loading the asset…" />;
  if (error && !data) return <LoadError error={error} retry={() => mutate()} />;
  if (!data) return null;
  const now = Date.parse(data.generated_at);
  const openFlags = data.state?.flags ?? [];
  const isTank = data.asset.kind === "tank";
  return (
    <div className="space-y-6">
      {error && <LoadError error={error} retry={() => mutate()} />}
      <section className="card" aria-labelledby="asset-wrong">
        <h2 id="asset-wrong" className="border-b border-rule px-3 py-2 text-lg font-bold">What needs attention</h2>
        <FleetAlarmList alarms={data.alarms} canAcknowledge={canAcknowledge} onChanged={() => mutate()} alarmsHref={`/alarms?site_id=${data.asset.site_id}`} />
        {openFlags.length > 0 && (
          <p className="flex flex-wrap items-center gap-2 border-t border-rule px-3 py-2 text-sm">
            Sensor faults open:
            {openFlags.map((f) => (
              <span key={`${f.channel_id}-${f.flag}`} className="inline-flex items-center gap-1">
                <FlagTag flag={f.flag} /> <span className="text-muted">for {formatDuration((now - Date.parse(f.since)) / 1000)}</span>
              </span>
            ))}
          </p>
        )}
      </section>

      <section className="card p-4" aria-labelledby="asset-now">
        <h2 id="asset-now" className="mb-3 text-lg font-bold">Now</h2>
        <NowPanel o={data} now={now} />
        {data.channels.length > 0 && (
          <p className="mt-3 text-sm text-muted">
            Measured by {data.channels.map((c, i) => (
              <span key={c.id}>{i > 0 && ", "}<Link href={`/devices/${c.device_id}`} className="underline">{c.device_name}</Link> channel <span className="figures">{c.index}</span></span>
            ))}
          </p>
        )}
      </section>

      <section className="card space-y-3 p-4" aria-labelledby="asset-trend">
        <h2 id="asset-trend" className="text-lg font-bold">{isTank ? "Level" : "Distance"} trend</h2>
        <RangePicker period={period} />
        <Trend o={data} period={period} />
        {isTank && <TankCaution />}
      </section>

      <AlarmHistory events={data.alarm_history} zone={data.asset.site_time_zone} />
      <FlagHistory flags={data.flags} now={now} zone={data.asset.site_time_zone} />
      {isTank && <DipList dips={data.dips} zone={data.asset.site_time_zone} />}
      <CalibrationList changes={data.calibrations} zone={data.asset.site_time_zone} />
    </div>
  );
}
