"use client";

import useSWR, { useSWRConfig } from "swr";
import { useRouter } from "next/navigation";
import { useMemo } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import type { SiteJson } from "@/lib/services/sites";
import { createSiteSchema, updateSiteSchema } from "@/lib/validations/site";
import { Loading, LoadError } from "@/components/ui/data-state";
import { applyApiErrors, errorReader, isUnder, fieldId, FormAlert, FormButtons, InputField, NumberField, numberOrNull, textOf } from "@/components/ui/form-fields";
import { flatErrors, payloadSchema, textBoxes } from "@/components/ui/form-schema";

const FIELDS = ["name", "time_zone", "latitude", "longitude", "air_temp_c", "humidity_pct", "escalation_delay_min"] as const;
type Values = Record<(typeof FIELDS)[number], string>;
const valuesSchema = textBoxes(FIELDS);

function initialValues(site?: SiteJson): Values {
  return {
    name: site?.name ?? "",
    time_zone: site?.time_zone ?? "",
    latitude: textOf(site?.latitude),
    longitude: textOf(site?.longitude),
    air_temp_c: textOf(site?.air_temp_c),
    humidity_pct: textOf(site?.humidity_pct),
    escalation_delay_min: textOf(site?.escalation_delay_min ?? 15),
  };
}

function payloadOf(v: Values) {
  return {
    name: v.name,
    time_zone: v.time_zone.trim(),
    latitude: numberOrNull(v.latitude),
    longitude: numberOrNull(v.longitude),
    air_temp_c: numberOrNull(v.air_temp_c),
    humidity_pct: numberOrNull(v.humidity_pct),
    escalation_delay_min: numberOrNull(v.escalation_delay_min) ?? undefined,
  };
}

/** Create (no `site`) or edit a site; `timeZones` comes from the server so both renders list the same zones. After saving, the site's page. */
export function SiteForm({ site, timeZones }: { site?: SiteJson; timeZones: string[] }) {
  const router = useRouter();
  const { mutate } = useSWRConfig();
  const schema = useMemo(() => payloadSchema(valuesSchema, payloadOf, site ? updateSiteSchema : createSiteSchema), [site]);
  const form = useForm<Values, unknown, z.output<typeof schema>>({ resolver: zodResolver(schema), defaultValues: initialValues(site) });
  const { register, handleSubmit, formState } = form;
  const errors = flatErrors(formState.errors);
  const busy = formState.isSubmitting || formState.isSubmitSuccessful;
  const { read, rest } = errorReader(errors);
  const id = (key: string) => fieldId("site", key);

  const onSubmit = handleSubmit(async (payload) => {
    try {
      const saved = await fetchJson<{ id: string }>(site ? `/api/sites/${site.id}` : "/api/sites", { method: site ? "PATCH" : "POST", body: JSON.stringify(payload) });
      await mutate(isUnder("/api/sites"));
      router.push(`/sites/${saved.id}`);
      router.refresh();
    } catch (e) {
      applyApiErrors(form, e);
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="card grid max-w-3xl gap-4 p-4 sm:grid-cols-2">
      <InputField id={id("name")} label="Name" {...register("name")} error={read("name")} className="sm:col-span-2" />
      <InputField
        id={id("time_zone")}
        label="Time zone"
        list="site-time-zones"
        {...register("time_zone")}
        error={read("time_zone")}
        hint="An IANA zone, such as Europe/Dublin or America/Chicago. Start typing to pick one."
        autoComplete="off"
        className="sm:col-span-2"
      />
      <datalist id="site-time-zones">
        {timeZones.map((tz) => <option key={tz} value={tz} />)}
      </datalist>
      <NumberField id={id("latitude")} label="Latitude" unit="°, north positive" {...register("latitude")} error={read("latitude")} />
      <NumberField id={id("longitude")} label="Longitude" unit="°, east positive" {...register("longitude")} error={read("longitude")} />
      <NumberField
        id={id("air_temp_c")}
        label="Fixed air temperature"
        unit="°C"
        {...register("air_temp_c")}
        error={read("air_temp_c")}
        hint="Used when a reading carries no temperature and the site has no samples; leave empty for 20 °C."
      />
      <NumberField id={id("humidity_pct")} label="Relative humidity" unit="%" {...register("humidity_pct")} error={read("humidity_pct")} hint="Optional; refines the speed of sound." />
      <NumberField
        id={id("escalation_delay_min")}
        label="Escalation delay"
        unit="min"
        step={1}
        {...register("escalation_delay_min")}
        error={read("escalation_delay_min")}
        hint="How long an unacknowledged alarm waits before the next person on call is told."
      />
      <div className="sm:col-span-2"><FormAlert errors={errors} rest={rest()} /></div>
      <div className="sm:col-span-2"><FormButtons busy={busy} label={site ? "Save site" : "Add site"} cancelHref="/sites" /></div>
    </form>
  );
}

export function SiteEditor({ id, timeZones }: { id: string; timeZones: string[] }) {
  const { data, error, isLoading, mutate } = useSWR<SiteJson>(`/api/sites/${id}`, swrFetcher, { revalidateOnFocus: false });
  if (isLoading) return <Loading />;
  if (error) return <LoadError error={error} retry={() => mutate()} />;
  return data ? <SiteForm key={data.id} site={data} timeZones={timeZones} /> : null;
}
