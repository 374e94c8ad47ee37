"use client";

import useSWR, { useSWRConfig } from "swr";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useMemo, useState } from "react";
import { useForm, useWatch, type Control } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import { tankCapacity, tankHeight, type StrappingPoint, type TankGeometry } from "@/lib/geometry/tank-volume";
import { ASSET_KINDS, assetConsistencyIssues, createAssetSchema, geometrySchema, updateAssetSchema } from "@/lib/validations/asset";
import type { AssetJson, AssetWarning } from "@/lib/services/assets";
import type { SiteJson } from "@/lib/services/sites";
import { Loading, LoadError } from "@/components/ui/data-state";
import { useFigures, useQuantityInput } from "@/components/ui/display-settings";
import { QuantityField } from "@/components/ui/quantity-field";
import type { QuantityInput } from "@/lib/units/quantity-input";
import {
  applyApiErrors,
  useSelectsFollowOptions,
  errorReader,
  isUnder,
  fieldId,
  FormAlert,
  FormButtons,
  InputField,
  NumberField,
  numberOrNull,
  SelectField,
  TextAreaField,
  textOf,
} from "@/components/ui/form-fields";
import { flatErrors, payloadSchema, quantityIssues, textBoxes, type FormIssue } from "@/components/ui/form-schema";

const SHAPES = { vertical_cylinder: "Vertical cylinder", horizontal_cylinder: "Horizontal cylinder", rectangular: "Rectangular", strapping: "Strapping table" } as const;

const GEOMETRY_FIELDS = ["shape", "diameter_m", "height_m", "length_m", "width_m", "bottom", "bottom_depth_m", "heads", "head_depth_m", "points"] as const;
const ASSET_FIELDS = ["site_id", "kind", "name", "mount_height_m", "safe_fill_pct", "reorder_pct", "floor_distance_m", "occupied_below_m", "bay_level", "bay_row", "bay_col"] as const;
type GeometryValues = Record<(typeof GEOMETRY_FIELDS)[number], string>;
// The boxes as typed; the geometry's sit under "geometry." as the API names them, so its messages land beside them.
type Values = Record<(typeof ASSET_FIELDS)[number], string> & { geometry: GeometryValues };
const valuesSchema = textBoxes(ASSET_FIELDS).extend({ geometry: textBoxes(GEOMETRY_FIELDS) });

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
    geometry: {
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
    },
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

// Every number of a geometry is a length, typed in the person's unit and read back in metres.
function geometryOf(v: GeometryValues, qi: QuantityInput): unknown {
  const n = (key: keyof GeometryValues) => qi.read(v[key], "length");
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
  const n = (key: keyof Values) => numberOrNull(v[key] as string);
  const len = (key: keyof Values) => qi.read(v[key] as string, "length");
  const fixed = creating ? { site_id: v.site_id, kind: v.kind } : {};
  if (v.kind === "tank") return { ...fixed, name: v.name, mount_height_m: len("mount_height_m"), safe_fill_pct: n("safe_fill_pct"), reorder_pct: n("reorder_pct"), geometry: geometryOf(v.geometry, qi) };
  if (v.kind === "bay") {
    return { ...fixed, name: v.name, floor_distance_m: len("floor_distance_m"), occupied_below_m: len("occupied_below_m"), bay_level: v.bay_level.trim() || null, bay_row: n("bay_row"), bay_col: n("bay_col") };
  }
  return { ...fixed, name: v.name };
}

/** What the API's schema cannot say about the form: a length that is no length (in the person's terms), an unchosen site, an unreadable strapping row, and on an edit the rules across fields (the patch schema checks fields alone). */
function formIssues(v: Values, payload: unknown, creating: boolean, qi: QuantityInput): FormIssue[] {
  const lengths = ["diameter_m", "height_m", "length_m", "width_m", "bottom_depth_m", "head_depth_m"] as const;
  const issues: FormIssue[] = quantityIssues(qi, payload, {
    mount_height_m: v.mount_height_m,
    floor_distance_m: v.floor_distance_m,
    occupied_below_m: v.occupied_below_m,
    ...Object.fromEntries(lengths.map((key) => [`geometry.${key}`, v.geometry[key]])),
  });
  if (creating && !v.site_id) issues.push({ path: "site_id", message: "Choose the site." });
  const strappingError = v.kind === "tank" && v.geometry.shape === "strapping" ? parseStrapping(v.geometry.points).error : undefined;
  if (strappingError) issues.push({ path: "geometry.points", message: strappingError });
  if (!creating) {
    const patch = updateAssetSchema.safeParse(payload);
    if (patch.success) issues.push(...assetConsistencyIssues({ kind: v.kind, ...patch.data }));
  }
  return issues;
}

function LiveCapacity({ control, qi }: { control: Control<Values, unknown, unknown>; qi: QuantityInput }) {
  const fig = useFigures();
  const [geometry, safeFillText] = useWatch({ control, name: ["geometry", "safe_fill_pct"] });
  const parsed = geometrySchema.safeParse(geometryOf(geometry, qi));
  const safeFill = numberOrNull(safeFillText);
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
  // An asset keeps its site and kind: on an edit they come from the asset, whatever the disabled boxes hold.
  const fixed = useMemo(() => (asset ? { site_id: asset.site_id, kind: asset.kind } : {}), [asset]);
  const qi = useQuantityInput();
  const schema = useMemo(
    () =>
      payloadSchema(
        valuesSchema,
        (v) => payloadOf({ ...v, ...fixed }, creating, qi),
        creating ? createAssetSchema : updateAssetSchema,
        (v, payload) => formIssues({ ...v, ...fixed }, payload, creating, qi),
      ),
    [creating, fixed, qi],
  );
  const form = useForm<Values, unknown, z.output<typeof schema>>({ resolver: zodResolver(schema), defaultValues: initialValues(asset, siteId, qi) });
  const { register, handleSubmit, control, formState } = form;
  const [chosenKind, shape, bottom, heads] = useWatch({ control, name: ["kind", "geometry.shape", "geometry.bottom", "geometry.heads"] });
  const kind = asset?.kind ?? chosenKind;
  const errors = flatErrors(formState.errors);
  const busy = formState.isSubmitting || formState.isSubmitSuccessful;
  // Saved, with what will not read (a bottom beyond the sensor's range…): said before leaving the form.
  const [savedWithWarnings, setSavedWithWarnings] = useState<{ id: string; warnings: AssetWarning[] } | null>(null);
  const sites = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  useSelectsFollowOptions(form, ["site_id"], sites.data);
  const { read, rest } = errorReader(errors);
  const id = (key: string) => fieldId("asset", key);
  const num = (key: (typeof ASSET_FIELDS)[number], label: string, unit: string, hint?: string) => (
    <NumberField id={id(key)} label={label} unit={unit} {...register(key)} error={read(key)} hint={hint} />
  );
  const len = (key: (typeof ASSET_FIELDS)[number], label: string, hint?: string) => (
    <QuantityField id={id(key)} label={label} input={qi} quantity="length" {...register(key)} error={read(key)} hint={hint} />
  );
  const g = (key: keyof GeometryValues, label: string, hint?: string) => (
    <QuantityField id={id(key)} label={label} input={qi} quantity="length" {...register(`geometry.${key}`)} error={read(`geometry.${key}`)} hint={hint} />
  );

  const onSubmit = handleSubmit(async (payload) => {
    try {
      const saved = await fetchJson<{ id: string; warnings: AssetWarning[] }>(asset ? `/api/assets/${asset.id}` : "/api/assets", { method: asset ? "PATCH" : "POST", body: JSON.stringify(payload) });
      await mutate(isUnder("/api/assets"));
      if (saved.warnings?.length) return setSavedWithWarnings(saved);
      router.push(`/assets/${saved.id}`);
      router.refresh();
    } catch (e) {
      applyApiErrors(form, e);
    }
  });

  if (savedWithWarnings) {
    return (
      <div role="status" className="card max-w-3xl space-y-3 border-l-4 border-medium p-4">
        <p className="font-bold">Saved, with a warning:</p>
        <ul className="list-disc pl-5 text-sm">{savedWithWarnings.warnings.map((w) => <li key={w.message}>{w.message}</li>)}</ul>
        <Link href={`/assets/${savedWithWarnings.id}`} className="btn">Go to the asset</Link>
      </div>
    );
  }

  return (
    <form onSubmit={onSubmit} noValidate className="card grid max-w-3xl gap-4 p-4 sm:grid-cols-2">
      <SelectField id={id("site_id")} label="Site" {...register("site_id")} error={read("site_id")} disabled={!creating} hint={creating ? undefined : "An asset stays at its site."}>
        <option value="">Choose…</option>
        {sites.data?.items.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
      </SelectField>
      <SelectField id={id("kind")} label="Kind" {...register("kind")} error={read("kind")} disabled={!creating}>
        {ASSET_KINDS.map((k) => <option key={k} value={k}>{k}</option>)}
      </SelectField>
      <InputField id={id("name")} label="Name" {...register("name")} error={read("name")} className="sm:col-span-2" />

      {kind === "tank" && (
        <fieldset className="grid gap-4 sm:col-span-2 sm:grid-cols-2">
          <legend className="mb-2 text-lg font-bold">Tank</legend>
          <SelectField id={id("shape")} label="Shape" {...register("geometry.shape")} error={read("geometry")} className="sm:col-span-2">
            {Object.entries(SHAPES).map(([value, label]) => <option key={value} value={value}>{label}</option>)}
          </SelectField>
          {shape === "vertical_cylinder" && (
            <>
              {g("diameter_m", "Diameter")}
              {g("height_m", "Shell height", "The straight wall above the bottom.")}
              <SelectField id={id("bottom")} label="Bottom" {...register("geometry.bottom")} error={read("geometry.bottom")}>
                <option value="flat">flat</option>
                <option value="cone">cone</option>
                <option value="ellipsoidal">ellipsoidal</option>
              </SelectField>
              {bottom !== "flat" && g("bottom_depth_m", "Bottom depth", "How far the bottom reaches below the shell.")}
            </>
          )}
          {shape === "horizontal_cylinder" && (
            <>
              {g("diameter_m", "Diameter")}
              {g("length_m", "Shell length", "The straight shell, heads excluded.")}
              <SelectField id={id("heads")} label="Heads" {...register("geometry.heads")} error={read("geometry.heads")}>
                <option value="flat">flat</option>
                <option value="hemispherical">hemispherical</option>
                <option value="ellipsoidal">ellipsoidal</option>
              </SelectField>
              {heads === "ellipsoidal" && g("head_depth_m", "Head depth", "Leave empty for a 2:1 head (a quarter of the diameter).")}
            </>
          )}
          {shape === "rectangular" && (
            <>
              {g("length_m", "Length")}
              {g("width_m", "Width")}
              {g("height_m", "Height")}
            </>
          )}
          {shape === "strapping" && (
            <TextAreaField
              id={id("points")}
              label="Strapping table"
              rows={8}
              {...register("geometry.points")}
              error={read("geometry.points")}
              hint="One row per line: level_m,volume_l (level from the lowest point), such as 0.50,1200."
              className="sm:col-span-2"
            />
          )}
          <LiveCapacity control={control} qi={qi} />
          {len("mount_height_m", "Sensor mounting height", "The sensor face above the tank bottom.")}
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

      {kind === "bay" && (
        <fieldset className="grid gap-4 sm:col-span-2 sm:grid-cols-2">
          <legend className="mb-2 text-lg font-bold">Bay</legend>
          {len("floor_distance_m", "Floor distance", "From the sensor face to the empty floor.")}
          {len("occupied_below_m", "Occupied below", "A distance nearer than this counts as a car.")}
          <InputField id={id("bay_level")} label="Level name" {...register("bay_level")} error={read("bay_level")} hint="Such as P1 or Roof." className="sm:col-span-2" />
          {num("bay_row", "Row", "")}
          {num("bay_col", "Column", "")}
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
