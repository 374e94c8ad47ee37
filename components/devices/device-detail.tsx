"use client";

import useSWR from "swr";
import { swrFetcher } from "@/lib/fetcher";
import type { AssetJson } from "@/lib/services/assets";
import type { describeDeviceTiming, DeviceJson } from "@/lib/services/devices";
import type { SiteJson } from "@/lib/services/sites";
import { Loading, LoadError } from "@/components/ui/data-state";
import { DeviceKeyActions } from "@/components/devices/device-key-actions";
import { isOffline, PROFILE_LABELS } from "@/components/devices/device-table";
import { formatAge } from "@/components/fleet/fleet-figures";
import { useFigures } from "@/components/ui/display-settings";
import type { Figures } from "@/lib/format/figures";
import { SiteTime } from "@/components/ui/site-time";
import { STACKED_TABLE } from "@/components/ui/form-fields";

type DeviceTiming = NonNullable<Awaited<ReturnType<typeof describeDeviceTiming>>>;
type DeviceKeyRow = { id: string; prefix: string; created_at: string; revoked_at: string | null };
type DeviceDetailJson = DeviceJson & { keys: DeviceKeyRow[]; timing: DeviceTiming | null };

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
            ["Last seen", <>{data.last_seen_at ? formatAge(data.last_seen_at) : "never"}{isOffline(data) && " · offline (no reading for three expected intervals)"}</>],
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

      <section className="card overflow-x-auto" aria-labelledby="device-channels">
        <h2 id="device-channels" className="px-4 pt-4 text-lg font-bold">Channels</h2>
        <table className={STACKED_TABLE}>
          <thead>
            <tr>
              <th scope="col">Index</th>
              <th scope="col">Asset</th>
              <th scope="col">Min range</th>
              <th scope="col">Max range</th>
              <th scope="col">Face offset</th>
              <th scope="col">Calibration</th>
            </tr>
          </thead>
          <tbody>
            {data.channels.map((c) => {
              const asset = assetOf(c.asset_id);
              return (
                <tr key={c.id}>
                  <td data-label="Index" className="figures">{c.index}</td>
                  <td data-label="Asset">{c.asset_id ? (asset ? `${asset.name} (${asset.kind})` : "…") : "none"}</td>
                  <td data-label="Min range" className="figures">{figures.length(c.min_range_m)}</td>
                  <td data-label="Max range" className="figures">{figures.length(c.max_range_m)}</td>
                  <td data-label="Face offset" className="figures">{figures.length(c.face_offset_m)}</td>
                  <td data-label="Calibration" className="figures">{`${c.calibration_offset_m >= 0 ? "+" : ""}${c.calibration_offset_m.toFixed(3)} m, ×${c.calibration_scale}`}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </section>

      <section className="card space-y-3 overflow-x-auto pb-4" aria-labelledby="device-keys">
        <h2 id="device-keys" className="px-4 pt-4 text-lg font-bold">Keys</h2>
        <table className={STACKED_TABLE}>
          <thead>
            <tr>
              <th scope="col">Prefix</th>
              <th scope="col">Created</th>
              <th scope="col">Revoked</th>
            </tr>
          </thead>
          <tbody>
            {data.keys.map((k) => (
              <tr key={k.id}>
                <td data-label="Prefix" className="figures">ht_{k.prefix}_…</td>
                <td data-label="Created" className="figures"><SiteTime at={k.created_at} zone={site.data?.time_zone} /></td>
                <td data-label="Revoked" className="figures">{k.revoked_at ? <SiteTime at={k.revoked_at} zone={site.data?.time_zone} /> : <span className="font-sans">active</span>}</td>
              </tr>
            ))}
          </tbody>
        </table>
        {canManage && (
          <div className="px-4">
            <DeviceKeyActions deviceId={data.id} hasActiveKey={activeKeys.length > 0} onChanged={() => mutate()} />
          </div>
        )}
      </section>
    </div>
  );
}
