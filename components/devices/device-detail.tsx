"use client";

import useSWR from "swr";
import { swrFetcher } from "@/lib/fetcher";
import type { AssetJson } from "@/lib/services/assets";
import type { describeDeviceTiming, DeviceJson } from "@/lib/services/devices";
import type { SiteJson } from "@/lib/services/sites";
import { Loading, LoadError } from "@/components/ui/data-state";
import { DeviceKeyActions } from "@/components/devices/device-key-actions";
import { isOffline, PROFILE_LABELS } from "@/components/devices/device-table";
import { useFigures } from "@/components/ui/display-settings";
import type { Figures } from "@/lib/format/figures";
import { RelativeTime, SiteTime } from "@/components/ui/site-time";
import { createColumnHelper } from "@tanstack/react-table";
import { DataTable } from "@/components/ui/data-table";

type DeviceTiming = NonNullable<Awaited<ReturnType<typeof describeDeviceTiming>>>;
type DeviceKeyRow = { id: string; prefix: string; created_at: string; revoked_at: string | null };
type DeviceDetailJson = DeviceJson & { keys: DeviceKeyRow[]; timing: DeviceTiming | null };

type Channel = DeviceJson["channels"][number];
const channelColumn = createColumnHelper<Channel>();
const keyColumn = createColumnHelper<DeviceKeyRow>();

function channelColumns(assetOf: (assetId: string | null) => AssetJson | undefined, figures: Figures) {
  const assetName = (c: Channel) => {
    const asset = assetOf(c.asset_id);
    return c.asset_id ? (asset ? `${asset.name} (${asset.kind})` : "…") : "none";
  };
  return [
    channelColumn.accessor("index", { header: "Index", meta: { cellClassName: "figures" } }),
    channelColumn.accessor(assetName, { id: "asset", header: "Asset" }),
    channelColumn.accessor("min_range_m", { header: "Min range", cell: (c) => figures.length(c.getValue()), meta: { cellClassName: "figures" } }),
    channelColumn.accessor("max_range_m", { header: "Max range", cell: (c) => figures.length(c.getValue()), meta: { cellClassName: "figures" } }),
    channelColumn.accessor("face_offset_m", { header: "Face offset", cell: (c) => figures.length(c.getValue()), meta: { cellClassName: "figures" } }),
    channelColumn.display({
      id: "calibration",
      header: "Calibration",
      cell: ({ row: { original: c } }) => `${c.calibration_offset_m >= 0 ? "+" : ""}${c.calibration_offset_m.toFixed(3)} m, ×${c.calibration_scale}`,
      meta: { cellClassName: "figures" },
    }),
  ];
}

function keyColumns(zone: string | undefined) {
  return [
    keyColumn.accessor("prefix", { header: "Prefix", cell: (c) => `ht_${c.getValue()}_…`, meta: { cellClassName: "figures" } }),
    keyColumn.accessor((k) => Date.parse(k.created_at), { id: "created", header: "Created", cell: (c) => <SiteTime at={c.row.original.created_at} zone={zone} />, meta: { cellClassName: "figures" } }),
    keyColumn.accessor((k) => (k.revoked_at ? Date.parse(k.revoked_at) : undefined), {
      id: "revoked",
      header: "Revoked",
      sortUndefined: "first",
      cell: (c) => (c.row.original.revoked_at ? <SiteTime at={c.row.original.revoked_at} zone={zone} /> : <span className="font-sans">active</span>),
      meta: { cellClassName: "figures" },
    }),
  ];
}

const fig = (text: string) => <span className="figures">{text}</span>;

function Facts({ items }: { items: [string, React.ReactNode][] }) {
  return (
    <dl className="grid gap-x-6 gap-y-2 p-4 sm:grid-cols-[max-content_1fr]">
      {items.map(([term, value]) => (
        <div key={term} className="contents">
          <dt className="text-sm font-bold">{term}</dt>
          <dd className="max-sm:mb-2">{value}</dd>
        </div>
      ))}
    </dl>
  );
}

function profileFacts(d: DeviceJson, figures: Figures): [string, React.ReactNode][] {
  const profile: [string, React.ReactNode] = ["Signal profile", `${PROFILE_LABELS[d.profile] ?? d.profile} (${d.profile})`];
  const rate: [string, React.ReactNode][] = [
    ["Expected interval", fig(`${d.expected_interval_s} s`)],
    ["Max requests a minute", fig(String(d.max_requests_per_min))],
    ["Firmware", d.firmware ?? "—"],
  ];
  if (d.profile === "capture") return [profile, ["Timer clock", fig(`${figures.count(d.clock_hz ?? 0)} Hz`)], ["Prescaler", fig(String(d.prescaler))], ["Timer width", fig(`${d.timer_bits} bits`)], ...rate];
  if (d.profile === "pulse_coded") return [profile, ["Scale", fig(`${d.us_per_mm} µs per mm`)], ...rate];
  if (d.profile === "duty_coded") return [profile, ["Zero", fig(figures.length(d.zero_m))], ["Span", fig(figures.length(d.span_m))], ...rate];
  return [profile, ...rate];
}

function Warning({ children }: { children: React.ReactNode }) {
  return (
    <p role="alert" className="border-l-4 border-high bg-card px-3 py-2 text-sm">
      {children}
    </p>
  );
}

/** The device page: what is wrong, its state now, its profile and timing, channels and keys. */
export function DeviceDetail({ id, canManage }: { id: string; canManage: boolean }) {
  const figures = useFigures();
  const { data, error, isLoading, mutate } = useSWR<DeviceDetailJson>(`/api/devices/${id}`, swrFetcher, { refreshInterval: 30000 });
  const site = useSWR<SiteJson>(data ? `/api/sites/${data.site_id}` : null, swrFetcher);
  const assets = useSWR<{ items: AssetJson[] }>(data ? `/api/assets?site_id=${data.site_id}` : null, swrFetcher);
  if (isLoading) return <Loading />;
  if (error) return <LoadError error={error} retry={() => mutate()} />;
  if (!data) return null;

  const assetOf = (assetId: string | null) => assets.data?.items.find((a) => a.id === assetId);
  const activeKeys = data.keys.filter((k) => !k.revoked_at);
  const t = data.timing;

  return (
    <div className="space-y-6">
      <div className="space-y-2">
        {t?.tanks_beyond_wrap.map((tank) => (
          <Warning key={tank.asset_id}>
            High: {tank.name} is {figures.length(tank.height_m)} tall, more than the {figures.length(t.wrap_range_m)} the timer covers before it wraps. Send the overflow
            count with each reading, or use a larger prescaler.
          </Warning>
        ))}
        {activeKeys.length === 0 && <Warning>No active key: this device cannot send readings.{canManage && " Rotate the key to issue a new one."}</Warning>}
      </div>

      <section className="card" aria-labelledby="device-now">
        <h2 id="device-now" className="px-4 pt-4 text-lg font-bold">Now</h2>
        <Facts
          items={[
            ["Site", site.data?.name ?? "…"],
            ["Last seen", <>{data.last_seen_at ? <RelativeTime at={data.last_seen_at} /> : "never"}{isOffline(data) && " · offline (no reading for three expected intervals)"}</>],
            ["Battery", fig(figures.volts(data.battery_v))],
            ["Signal", fig(figures.dbm(data.rssi_dbm))],
          ]}
        />
      </section>

      <section className="card" aria-labelledby="device-profile">
        <h2 id="device-profile" className="px-4 pt-4 text-lg font-bold">Profile and parameters</h2>
        <Facts items={profileFacts(data, figures)} />
        {t && (
          <>
            <h3 className="px-4 font-bold">Timing</h3>
            <Facts
              items={[
                ["Resolution", <>{fig(`${t.mm_per_tick.toPrecision(3)} mm`)} a tick ({fig(`${t.tick_us.toPrecision(4)} µs`)} a tick)</>],
                ["Timer wraps after", fig(`${(t.wrap_us / 1000).toPrecision(4)} ms`)],
                ["Range before the wrap", <>{fig(figures.length(t.wrap_range_m))} at {fig(figures.temperature(t.at_temp_c))}</>],
              ]}
            />
          </>
        )}
      </section>

      <DataTable data={data.channels} columns={channelColumns(assetOf, figures)} getRowId={(c) => c.id} label="Channels" title empty="This device has no channels." />

      <DataTable
        data={data.keys}
        columns={keyColumns(site.data?.time_zone)}
        getRowId={(k) => k.id}
        label="Keys"
        title
        empty="This device has no key."
        footer={
          canManage && (
            <div className="p-4">
              <DeviceKeyActions deviceId={data.id} hasActiveKey={activeKeys.length > 0} onChanged={() => mutate()} />
            </div>
          )
        }
      />
    </div>
  );
}
