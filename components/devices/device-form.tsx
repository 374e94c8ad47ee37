"use client";

import Link from "next/link";
import useSWR, { useSWRConfig } from "swr";
import { useRouter } from "next/navigation";
import { useMemo, useState } from "react";
import { useFieldArray, useForm, useWatch, type Control } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { ApiError, fetchJson, swrFetcher } from "@/lib/fetcher";
import { captureResolution } from "@/lib/physics/time-of-flight";
import { speedOfSoundDry } from "@/lib/physics/speed-of-sound";
import { createDeviceSchema, profileIssues, PROFILES, updateDeviceSchema, type SignalProfile } from "@/lib/validations/device";
import type { AssetJson } from "@/lib/services/assets";
import type { DeviceJson } from "@/lib/services/devices";
import type { SiteJson } from "@/lib/services/sites";
import { Loading, LoadError } from "@/components/ui/data-state";
import { DeviceKeyReveal } from "@/components/devices/device-key-reveal";
import { PROFILE_LABELS } from "@/components/devices/device-table";
import { applyApiErrors, useSelectsFollowOptions, errorReader, isUnder, fieldId, FormAlert, FormButtons, InputField, NumberField, numberOrNull, SelectField, textOf } from "@/components/ui/form-fields";
import { flatErrors, payloadSchema, textBoxes, type FormIssue } from "@/components/ui/form-schema";

const PROFILE_FIELDS: Record<SignalProfile, ("clock_hz" | "prescaler" | "timer_bits" | "us_per_mm" | "zero_m" | "span_m")[]> = {
  echo: [],
  capture: ["clock_hz", "prescaler", "timer_bits"],
  pulse_coded: ["us_per_mm"],
  duty_coded: ["zero_m", "span_m"],
};

const DEVICE_FIELDS = ["site_id", "serial", "name", "profile", "clock_hz", "prescaler", "timer_bits", "us_per_mm", "zero_m", "span_m", "expected_interval_s", "max_requests_per_min"] as const;
const CHANNEL_FIELDS = ["index", "asset_id", "min_range_m", "max_range_m", "face_offset_m"] as const;
type ChannelRow = Record<(typeof CHANNEL_FIELDS)[number], string>;
type Values = Record<(typeof DEVICE_FIELDS)[number], string> & { channels: ChannelRow[] };
const valuesSchema = textBoxes(DEVICE_FIELDS).extend({ channels: z.array(textBoxes(CHANNEL_FIELDS)) });

function channelRow(c?: Partial<DeviceJson["channels"][number]> & { index: number }): ChannelRow {
  return { index: String(c?.index ?? 0), asset_id: c?.asset_id ?? "", min_range_m: textOf(c?.min_range_m ?? 0.02), max_range_m: textOf(c?.max_range_m ?? 4), face_offset_m: textOf(c?.face_offset_m ?? 0) };
}

function initialValues(d: DeviceJson | undefined): Values {
  return {
    site_id: d?.site_id ?? "",
    serial: d?.serial ?? "",
    name: d?.name ?? "",
    profile: d?.profile ?? "echo",
    clock_hz: textOf(d?.clock_hz),
    prescaler: textOf(d?.prescaler),
    timer_bits: textOf(d?.timer_bits ?? 16),
    us_per_mm: textOf(d?.us_per_mm),
    zero_m: textOf(d?.zero_m),
    span_m: textOf(d?.span_m),
    expected_interval_s: textOf(d?.expected_interval_s ?? 60),
    max_requests_per_min: textOf(d?.max_requests_per_min ?? 120),
    channels: d?.channels.length ? d.channels.map(channelRow) : [channelRow({ index: 0 })],
  };
}

function payloadOf(v: Values, creating: boolean) {
  const n = (text: string) => numberOrNull(text);
  const profile = v.profile as SignalProfile;
  return {
    ...(creating ? { site_id: v.site_id } : {}),
    serial: v.serial,
    name: v.name,
    profile,
    ...Object.fromEntries((PROFILE_FIELDS[profile] ?? []).map((k) => [k, n(v[k])])),
    expected_interval_s: n(v.expected_interval_s) ?? undefined,
    max_requests_per_min: n(v.max_requests_per_min) ?? undefined,
    channels: v.channels.map((c) => ({ index: Number(c.index), asset_id: c.asset_id || null, min_range_m: n(c.min_range_m), max_range_m: n(c.max_range_m), face_offset_m: n(c.face_offset_m) ?? 0 })),
  };
}

/** An unchosen site; on an edit, the parameters the profile needs (the patch schema checks fields alone). */
function formIssues(v: Values, payload: ReturnType<typeof payloadOf>, creating: boolean): FormIssue[] {
  if (creating) return v.site_id ? [] : [{ path: "site_id", message: "Choose the site." }];
  return profileIssues(payload);
}

/** The API names an asset error by channel index ("channels.3.asset_id"); the form shows errors by row. */
function rowOfChannelKey(channels: ChannelRow[]) {
  return (key: string) => {
    const m = /^channels\.(\d+)\.asset_id$/.exec(key);
    const row = m ? channels.findIndex((c) => c.index === m[1]) : -1;
    return row >= 0 ? `channels.${row}.asset_id` : key;
  };
}

function CaptureTiming({ control }: { control: Control<Values, unknown, unknown> }) {
  const texts = useWatch({ control, name: ["clock_hz", "prescaler", "timer_bits"] });
  const [clockHz, prescaler, timerBits] = texts.map((t) => numberOrNull(t) ?? Number.NaN);
  const r = captureResolution({ clockHz, prescaler, timerBits, speedMs: speedOfSoundDry(20) });
  return (
    <p className="text-sm sm:col-span-2" aria-live="polite">
      {r.ok ? (
        <>
          One tick is <span className="figures">{r.value.tickUs.toPrecision(4)} µs</span> or <span className="figures">{r.value.mmPerTick.toPrecision(3)} mm</span>; the timer wraps after{" "}
          <span className="figures">{(r.value.wrapUs / 1000).toPrecision(4)} ms</span>, a range of <span className="figures">{r.value.wrapRangeM.toFixed(2)} m</span> (at 20 °C).
        </>
      ) : (
        <span className="text-muted">Enter the clock, prescaler and timer width to see the resolution.</span>
      )}
    </p>
  );
}

/** Create (no `device`) or edit a device and its channel assignment; after creating, shows the new key once. */
export function DeviceForm({ device }: { device?: DeviceJson }) {
  const router = useRouter();
  const { mutate } = useSWRConfig();
  const creating = !device;
  const schema = useMemo(
    () => payloadSchema(valuesSchema, (v) => payloadOf(v, creating), creating ? createDeviceSchema : updateDeviceSchema, (v, payload) => formIssues(v, payload as ReturnType<typeof payloadOf>, creating)),
    [creating],
  );
  const form = useForm<Values, unknown, z.output<typeof schema>>({ resolver: zodResolver(schema), defaultValues: initialValues(device) });
  const { register, handleSubmit, control, formState, getValues, setValue, setError } = form;
  const channels = useFieldArray({ control, name: "channels" });
  const [chosenSite, profileText, indexes] = useWatch({ control, name: ["site_id", "profile", "channels"] });
  const siteId = device?.site_id ?? chosenSite;
  const [created, setCreated] = useState<{ id: string; name: string; api_key: string } | null>(null);
  const sites = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  const assets = useSWR<{ items: AssetJson[] }>(siteId ? `/api/assets?site_id=${siteId}` : null, swrFetcher);
  useSelectsFollowOptions(form, ["site_id"], sites.data);
  useSelectsFollowOptions(form, indexes.map((_, row) => `channels.${row}.asset_id` as const), assets.data);
  const errors = flatErrors(formState.errors);
  const busy = formState.isSubmitting;
  const { read, rest } = errorReader(errors);
  const id = (key: string) => fieldId("device", key);
  const freeIndex = [0, 1, 2, 3, 4, 5, 6, 7].find((i) => !indexes.some((c) => Number(c.index) === i));

  // Channels may only watch assets at the device's own site.
  const siteField = register("site_id", { onChange: () => getValues("channels").forEach((_, row) => setValue(`channels.${row}.asset_id`, "")) });

  const onSubmit = handleSubmit(async (payload) => {
    try {
      if (device) {
        await fetchJson(`/api/devices/${device.id}`, { method: "PATCH", body: JSON.stringify(payload) });
        await mutate(isUnder("/api/devices"));
        router.push(`/devices/${device.id}`);
        router.refresh();
        return;
      }
      const saved = await fetchJson<DeviceJson & { api_key: string }>("/api/devices", { method: "POST", body: JSON.stringify(payload) });
      // The new key is shown once, here; the device's page is one click away.
      setCreated({ id: saved.id, name: saved.name, api_key: saved.api_key });
      void mutate(isUnder("/api/devices"));
    } catch (e) {
      if (e instanceof ApiError && e.status === 409) setError("serial", { message: e.message });
      else applyApiErrors(form, e, rowOfChannelKey(getValues("channels")));
    }
  });

  if (created) {
    return (
      <div className="max-w-3xl space-y-4">
        <p role="status">Device {created.name} added.</p>
        <DeviceKeyReveal apiKey={created.api_key} heading="Its API key" />
        <Link href={`/devices/${created.id}`} className="btn">Open the device page</Link>
      </div>
    );
  }

  const profile = profileText as SignalProfile;
  const num = (key: (typeof DEVICE_FIELDS)[number], label: string, unit: string, hint?: string) => (
    <NumberField id={id(key)} label={label} unit={unit} {...register(key)} error={read(key)} hint={hint} />
  );

  return (
    <form onSubmit={onSubmit} noValidate className="card grid max-w-4xl gap-4 p-4 sm:grid-cols-2">
      <SelectField id={id("site_id")} label="Site" {...siteField} error={read("site_id")} disabled={!creating} hint={creating ? undefined : "A device stays at its site."}>
        <option value="">Choose…</option>
        {sites.data?.items.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
      </SelectField>
      <InputField id={id("serial")} label="Serial" {...register("serial")} error={read("serial")} hint="As printed on the unit." autoComplete="off" />
      <InputField id={id("name")} label="Name" {...register("name")} error={read("name")} className="sm:col-span-2" />

      <fieldset className="grid gap-4 sm:col-span-2 sm:grid-cols-2">
        <legend className="mb-2 text-lg font-bold">Signal</legend>
        <SelectField id={id("profile")} label="Signal profile" {...register("profile")} error={read("profile")} className="sm:col-span-2">
          {PROFILES.map((p) => <option key={p} value={p}>{PROFILE_LABELS[p]} ({p})</option>)}
        </SelectField>
        {profile === "echo" && <p className="text-sm text-muted sm:col-span-2">The device sends the echo&apos;s round-trip time in µs; Halftrip corrects it for the air temperature.</p>}
        {profile === "capture" && (
          <>
            {num("clock_hz", "Timer clock", "Hz")}
            {num("prescaler", "Prescaler", "divides the clock")}
            {num("timer_bits", "Timer width", "bits", "8–32 bits.")}
            <CaptureTiming control={control} />
          </>
        )}
        {profile === "pulse_coded" && num("us_per_mm", "Scale", "µs per mm", "The pulse width for each millimetre of one-way distance, from the sensor's data sheet.")}
        {profile === "duty_coded" && (
          <>
            {num("zero_m", "Zero", "m", "The distance at 0 % duty.")}
            {num("span_m", "Span", "m", "The distance at 100 % duty minus the zero.")}
          </>
        )}
        {num("expected_interval_s", "Expected interval", "s", "How often the device reports; three missed intervals mark it offline.")}
        {num("max_requests_per_min", "Max requests a minute", "", "Above this the API answers 429.")}
      </fieldset>

      <fieldset className="space-y-3 sm:col-span-2">
        <legend className="mb-2 text-lg font-bold">Channels</legend>
        {read("channels") && <p className="field-error">{read("channels")}</p>}
        {!siteId && <p className="text-sm text-muted">Choose the site first: a channel watches an asset at the device&apos;s site.</p>}
        {channels.fields.map((c, row) => {
          const cid = (field: string) => id(`channels.${row}.${field}`);
          const err = (field: string) => read(`channels.${row}.${field}`);
          return (
            <div key={c.id} className="grid gap-3 rounded border border-rule p-3 sm:grid-cols-[6rem_2fr_1fr_1fr_1fr_auto] sm:items-start" role="group" aria-label={`Channel row ${row + 1}`}>
              <SelectField id={cid("index")} label="Index" {...register(`channels.${row}.index`)} error={err("index")}>
                {[0, 1, 2, 3, 4, 5, 6, 7].map((i) => <option key={i} value={i}>{i}</option>)}
              </SelectField>
              <SelectField id={cid("asset_id")} label="Asset" {...register(`channels.${row}.asset_id`)} error={err("asset_id")}>
                <option value="">None yet</option>
                {assets.data?.items.map((a) => <option key={a.id} value={a.id}>{a.name} ({a.kind})</option>)}
              </SelectField>
              <NumberField id={cid("min_range_m")} label="Min range" unit="m" {...register(`channels.${row}.min_range_m`)} error={err("min_range_m")} />
              <NumberField id={cid("max_range_m")} label="Max range" unit="m" {...register(`channels.${row}.max_range_m`)} error={err("max_range_m")} />
              <NumberField id={cid("face_offset_m")} label="Face offset" unit="m" {...register(`channels.${row}.face_offset_m`)} error={err("face_offset_m")} />
              <button type="button" className="btn-quiet sm:mt-6" disabled={channels.fields.length === 1} onClick={() => channels.remove(row)} aria-label={`Remove channel row ${row + 1}`}>
                Remove
              </button>
            </div>
          );
        })}
        {freeIndex !== undefined && (
          <button type="button" className="btn-quiet" onClick={() => channels.append(channelRow({ index: freeIndex }))}>
            Add a channel
          </button>
        )}
      </fieldset>

      <div className="sm:col-span-2"><FormAlert errors={errors} rest={rest()} /></div>
      <div className="sm:col-span-2"><FormButtons busy={busy} label={creating ? "Add device" : "Save device"} cancelHref={device ? `/devices/${device.id}` : "/devices"} /></div>
    </form>
  );
}

export function DeviceEditor({ id }: { id: string }) {
  const { data, error, isLoading, mutate } = useSWR<DeviceJson>(`/api/devices/${id}`, swrFetcher, { revalidateOnFocus: false });
  if (isLoading) return <Loading />;
  if (error) return <LoadError error={error} retry={() => mutate()} />;
  return data ? <DeviceForm key={data.id} device={data} /> : null;
}
