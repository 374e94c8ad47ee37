"use client";

import useSWR, { useSWRConfig } from "swr";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import { fieldErrors } from "@/lib/http/errors";
import { tankCapacity, tankHeight, type StrappingPoint, type TankGeometry } from "@/lib/geometry/tank-volume";
import { assetConsistencyIssues, createAssetSchema, geometrySchema, updateAssetSchema } from "@/lib/validations/asset";
import type { AssetJson } from "@/lib/services/assets";
import type { SiteJson } from "@/lib/services/sites";
import { Loading, LoadError } from "@/components/ui/data-state";
import { ASSET_KINDS } from "@/lib/validations/asset";
import { useFigures, useQuantityInput } from "@/components/ui/display-settings";
import { QuantityField } from "@/components/ui/quantity-field";
import type { QuantityInput } from "@/lib/units/quantity-input";
import {
  errorReader,
  isUnder,
  errorsFromApi,
  fieldId,
  FormAlert,
  FormButtons,
  InputField,
  NumberField,
  numberOrNull,
  SelectField,
  TextAreaField,
  textOf,
  type FieldErrors,
} from "@/components/ui/form-fields";

const SHAPES = { vertical_cylinder: "Vertical cylinder", horizontal_cylinder: "Horizontal cylinder", rectangular: "Rectangular", strapping: "Strapping table" } as const;

type Values = Record<
  | "site_id" | "kind" | "name" | "mount_height_m" | "safe_fill_pct" | "reorder_pct"
  | "shape" | "diameter_m" | "height_m" | "length_m" | "width_m" | "bottom" | "bottom_depth_m" | "heads" | "head_depth_m" | "points"
  | "floor_distance_m" | "occupied_below_m" | "bay_level" | "bay_row" | "bay_col",
  string
>;

function initialValues(asset: AssetJson | undefined, siteId: string, qi: QuantityInput): Values {
  const g = (asset?.geometry ?? {}) as Partial<Record<string, unknown>> & { points?: StrappingPoint[] };
  const t = (key: string) => qi.text(g[key] as number | undefined, "length");
  return {
    site_id: asset?.site_id ?? siteId,
    kind: asset?.kind ?? "tank",
    name: asset?.name ?? "",
    mount_height_m: qi.text(asset?.mount_height_m, "length"),
    safe_fill_pct: textOf(asset?.safe_fill_pct),
    reorder_pct: textOf(asset?.reorder_pct),
    shape: (g.shape as string) ?? "vertical_cylinder",
    diameter_m: t("diameter_m"),
    height_m: t("height_m"),
    length_m: t("length_m"),
    width_m: t("width_m"),
    bottom: (g.bottom as string) ?? "flat",
    bottom_depth_m: g.bottom === "flat" ? "" : t("bottom_depth_m"),
    heads: (g.heads as string) ?? "flat",
    head_depth_m: t("head_depth_m"),
    points: (g.points ?? []).map((p) => `${p.level_m},${p.volume_l}`).join("\n"),
    floor_distance_m: qi.text(asset?.floor_distance_m, "length"),
    occupied_below_m: qi.text(asset?.occupied_below_m, "length"),
    bay_level: asset?.bay_level ?? "",
    bay_row: textOf(asset?.bay_row),
    bay_col: textOf(asset?.bay_col),
  };
}

/** Rows of "level_m,volume_l"; a first row with words is taken as a header. */
function parseStrapping(text: string): { points: StrappingPoint[]; error?: string } {
  const points: StrappingPoint[] = [];
  const lines = text.split(/\r?\n/);
  for (const [i, raw] of lines.entries()) {
    const cells = raw.trim() ? raw.split(/[,;\t]/).map((c) => c.trim()) : [];
    if (!cells.length) continue;
    if (!points.length && cells.some((c) => /[a-z]/i.test(c))) continue;
    const [level, volume] = cells.map(Number);
    if (cells.length !== 2 || cells.includes("") || !Number.isFinite(level) || !Number.isFinite(volume)) {
      return { points, error: `Row ${i + 1}: write level_m,volume_l, such as 0.50,1200.` };
    }
    points.push({ level_m: level, volume_l: volume });
  }
  return { points };
}

function geometryOf(v: Values, qi: QuantityInput): unknown {
  const n = (key: keyof Values) => qi.read(v[key], "length");
  switch (v.shape) {
    case "vertical_cylinder":
      return { shape: v.shape, diameter_m: n("diameter_m"), height_m: n("height_m"), bottom: v.bottom, bottom_depth_m: v.bottom === "flat" ? 0 : (n("bottom_depth_m") ?? undefined) };
    case "horizontal_cylinder":
      return { shape: v.shape, diameter_m: n("diameter_m"), length_m: n("length_m"), heads: v.heads, ...(v.heads === "ellipsoidal" && n("head_depth_m") != null ? { head_depth_m: n("head_depth_m") } : {}) };
    case "rectangular":
      return { shape: v.shape, length_m: n("length_m"), width_m: n("width_m"), height_m: n("height_m") };
    default:
      return { shape: "strapping", points: parseStrapping(v.points).points };
  }
}

/** The formula behind the live capacity, so a person can check it by hand. */
function capacityFormula(g: TankGeometry): string {
  switch (g.shape) {
    case "rectangular":
      return "V = l·w·h";
    case "vertical_cylinder":
      return { flat: "V = π·D²/4·H", cone: "V = π·D²/4·(H + a/3), a = cone depth", ellipsoidal: "V = π·D²/4·(H + 2a/3), a = bottom depth" }[g.bottom];
    case "horizontal_cylinder":
      return { flat: "V = π·D²/4·L", hemispherical: "V = π·D²/4·L + π·D³/6", ellipsoidal: "V = π·D²/4·L + π·D²·a/3, a = head depth" }[g.heads];
    case "strapping":
      return "V from the table's highest row";
  }
}

function payloadOf(v: Values, creating: boolean, qi: QuantityInput): Record<string, unknown> {
  const n = (key: keyof Values) => numberOrNull(v[key]);
  const len = (key: keyof Values) => qi.read(v[key], "length");
  const fixed = creating ? { site_id: v.site_id, kind: v.kind } : {};
  if (v.kind === "tank") return { ...fixed, name: v.name, mount_height_m: len("mount_height_m"), safe_fill_pct: n("safe_fill_pct"), reorder_pct: n("reorder_pct"), geometry: geometryOf(v, qi) };
  if (v.kind === "bay") {
    return { ...fixed, name: v.name, floor_distance_m: len("floor_distance_m"), occupied_below_m: len("occupied_below_m"), bay_level: v.bay_level.trim() || null, bay_row: n("bay_row"), bay_col: n("bay_col") };
  }
  return { ...fixed, name: v.name };
}

function validate(v: Values, creating: boolean, qi: QuantityInput): { data?: Record<string, unknown>; errors: FieldErrors } {
  const payload = payloadOf(v, creating, qi);
  const parsed = creating ? createAssetSchema.safeParse(payload) : updateAssetSchema.safeParse(payload);
  const errors: FieldErrors = parsed.success ? {} : fieldErrors(parsed.error);
  if (parsed.success && !creating) for (const issue of assetConsistencyIssues({ kind: v.kind, ...parsed.data })) errors[issue.path] ??= issue.message;
  if (creating && !v.site_id) errors.site_id = "Choose the site.";
  const strappingError = v.kind === "tank" && v.shape === "strapping" ? parseStrapping(v.points).error : undefined;
  if (strappingError) errors["geometry.points"] = strappingError;
  return Object.keys(errors).length || !parsed.success ? { errors } : { data: parsed.data, errors };
}

function LiveCapacity({ values, qi }: { values: Values; qi: QuantityInput }) {
  const fig = useFigures();
  const parsed = geometrySchema.safeParse(geometryOf(values, qi));
  const safeFill = numberOrNull(values.safe_fill_pct);
  return (
    <div className="rounded border border-rule bg-paper p-3 sm:col-span-2" aria-live="polite" data-testid="live-capacity">
      {parsed.success ? (
        <>
          <p>
            <span className="font-bold">Capacity </span>
            <span className="figures text-lg">{fig.volume(tankCapacity(parsed.data))}</span>
            <span className="text-sm text-muted"> — computed: {capacityFormula(parsed.data)}</span>
          </p>
          <p className="text-sm">
            Total height <span className="figures">{fig.length(tankHeight(parsed.data))}</span>
            {safeFill != null && Number.isFinite(safeFill) && <> · safe fill {safeFill} % is <span className="figures">{fig.volume((tankCapacity(parsed.data) * safeFill) / 100)}</span></>}
          </p>
        </>
      ) : (
        <p className="text-sm text-muted">Enter the dimensions to see the capacity.</p>
      )}
    </div>
  );
}

/** Create (no `asset`) or edit an asset; the geometry fields follow the chosen shape. */
export function AssetForm({ asset, siteId = "" }: { asset?: AssetJson; siteId?: string }) {
  const router = useRouter();
  const { mutate } = useSWRConfig();
  const creating = !asset;
  const qi = useQuantityInput();
  const [values, setValues] = useState<Values>(() => initialValues(asset, siteId, qi));
  const [errors, setErrors] = useState<FieldErrors>({});
  const [busy, setBusy] = useState(false);
  const sites = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  const set = (key: keyof Values) => (e: React.ChangeEvent<HTMLInputElement | HTMLSelectElement | HTMLTextAreaElement>) => setValues((v) => ({ ...v, [key]: e.target.value }));
  const { read, rest } = errorReader(errors);
  const id = (key: string) => fieldId("asset", key);
  const num = (key: keyof Values, label: string, unit: string, errorKey: string = key, hint?: string, step?: number) => (
    <NumberField id={id(key)} label={label} unit={unit} value={values[key]} onChange={set(key)} error={read(errorKey)} hint={hint} step={step} />
  );
  const length = (key: keyof Values, label: string, errorKey: string = key, hint?: string) => (
    <QuantityField id={id(key)} label={label} input={qi} quantity="length" value={values[key]} onChange={set(key)} error={read(errorKey)} hint={hint} />
  );
  const g = (key: keyof Values, label: string, hint?: string) => length(key, label, `geometry.${key}`, hint);

  async function onSubmit(event: React.FormEvent) {
    event.preventDefault();
    const { data, errors: found } = validate(values, creating, qi);
    if (!data) return setErrors(found);
    setErrors({});
    setBusy(true);
    try {
      const saved = await fetchJson<{ id: string }>(asset ? `/api/assets/${asset.id}` : "/api/assets", { method: asset ? "PATCH" : "POST", body: JSON.stringify(data) });
      await mutate(isUnder("/api/assets"));
      router.push(`/assets/${saved.id}`);
      router.refresh();
    } catch (e) {
      setErrors(errorsFromApi(e));
      setBusy(false);
    }
  }

  return (
    <form onSubmit={onSubmit} noValidate className="card grid max-w-3xl gap-4 p-4 sm:grid-cols-2">
      <SelectField id={id("site_id")} label="Site" value={values.site_id} onChange={set("site_id")} error={read("site_id")} disabled={!creating} hint={creating ? undefined : "An asset stays at its site."}>
        <option value="">Choose…</option>
        {sites.data?.items.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
      </SelectField>
      <SelectField id={id("kind")} label="Kind" value={values.kind} onChange={set("kind")} error={read("kind")} disabled={!creating}>
        {ASSET_KINDS.map((k) => <option key={k} value={k}>{k}</option>)}
      </SelectField>
      <InputField id={id("name")} label="Name" value={values.name} onChange={set("name")} error={read("name")} className="sm:col-span-2" />

      {values.kind === "tank" && (
        <fieldset className="grid gap-4 sm:col-span-2 sm:grid-cols-2">
          <legend className="mb-2 text-lg font-bold">Tank</legend>
          <SelectField id={id("shape")} label="Shape" value={values.shape} onChange={set("shape")} error={read("geometry")} className="sm:col-span-2">
            {Object.entries(SHAPES).map(([value, label]) => <option key={value} value={value}>{label}</option>)}
          </SelectField>
          {values.shape === "vertical_cylinder" && (
            <>
              {g("diameter_m", "Diameter")}
              {g("height_m", "Shell height", "The straight wall above the bottom.")}
              <SelectField id={id("bottom")} label="Bottom" value={values.bottom} onChange={set("bottom")} error={read("geometry.bottom")}>
                <option value="flat">flat</option>
                <option value="cone">cone</option>
                <option value="ellipsoidal">ellipsoidal</option>
              </SelectField>
              {values.bottom !== "flat" && g("bottom_depth_m", "Bottom depth", "How far the bottom reaches below the shell.")}
            </>
          )}
          {values.shape === "horizontal_cylinder" && (
            <>
              {g("diameter_m", "Diameter")}
              {g("length_m", "Shell length", "The straight shell, heads excluded.")}
              <SelectField id={id("heads")} label="Heads" value={values.heads} onChange={set("heads")} error={read("geometry.heads")}>
                <option value="flat">flat</option>
                <option value="hemispherical">hemispherical</option>
                <option value="ellipsoidal">ellipsoidal</option>
              </SelectField>
              {values.heads === "ellipsoidal" && g("head_depth_m", "Head depth", "Leave empty for a 2:1 head (a quarter of the diameter).")}
            </>
          )}
          {values.shape === "rectangular" && (
            <>
              {g("length_m", "Length")}
              {g("width_m", "Width")}
              {g("height_m", "Height")}
            </>
          )}
          {values.shape === "strapping" && (
            <TextAreaField
              id={id("points")}
              label="Strapping table"
              rows={8}
              value={values.points}
              onChange={set("points")}
              error={read("geometry.points")}
              hint="One row per line: level_m,volume_l (level from the lowest point), such as 0.50,1200."
              className="sm:col-span-2"
            />
          )}
          <LiveCapacity values={values} qi={qi} />
          {length("mount_height_m", "Sensor mounting height", "mount_height_m", "The sensor face above the tank bottom.")}
          <div className="hidden sm:block" />
          {num("safe_fill_pct", "Safe fill", "%")}
          {num("reorder_pct", "Reorder level", "%")}
          <p role="note" className="rounded border border-rule bg-paper p-3 text-sm sm:col-span-2">
            <span className="font-bold">Caution: </span>
            Halftrip raises operational alarms only; it is not an overfill-prevention or safety system. Follow API 2350 / IEC 61511, local codes
            and licensed practice.
          </p>
        </fieldset>
      )}

      {values.kind === "bay" && (
        <fieldset className="grid gap-4 sm:col-span-2 sm:grid-cols-2">
          <legend className="mb-2 text-lg font-bold">Bay</legend>
          {length("floor_distance_m", "Floor distance", "floor_distance_m", "From the sensor face to the empty floor.")}
          {length("occupied_below_m", "Occupied below", "occupied_below_m", "A distance nearer than this counts as a car.")}
          <InputField id={id("bay_level")} label="Level name" value={values.bay_level} onChange={set("bay_level")} error={read("bay_level")} hint="Such as P1 or Roof." className="sm:col-span-2" />
          {num("bay_row", "Row", "", "bay_row", undefined, 1)}
          {num("bay_col", "Column", "", "bay_col", undefined, 1)}
        </fieldset>
      )}

      <div className="sm:col-span-2"><FormAlert errors={errors} rest={rest()} /></div>
      <div className="sm:col-span-2"><FormButtons busy={busy} label={creating ? "Add asset" : "Save asset"} cancelHref="/assets" /></div>
    </form>
  );
}

export function AssetEditor({ id }: { id: string }) {
  const { data, error, isLoading, mutate } = useSWR<AssetJson>(`/api/assets/${id}`, swrFetcher, { revalidateOnFocus: false });
  if (isLoading) return <Loading />;
  if (error) return <LoadError error={error} retry={() => mutate()} />;
  return data ? <AssetForm key={data.id} asset={data} /> : null;
}
