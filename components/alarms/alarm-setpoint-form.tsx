"use client";

import useSWR from "swr";
import { useMemo, useState } from "react";
import { useForm, useWatch } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import { SETPOINT_KEYS, type SetpointKey } from "@/lib/alarms/setpoints";
import { ALARM_PRIORITIES } from "@/lib/alarms/state-machine";
import type { SetpointsJson } from "@/lib/services/alarm-setpoints";
import { putSetpointsSchema } from "@/lib/validations/setpoint";
import { Loading, LoadError } from "@/components/ui/data-state";
import { applyApiErrors, errorReader, FormAlert, NumberField, SelectField, numberOrNull, textOf } from "@/components/ui/form-fields";
import { flatErrors, payloadSchema, quantityIssues } from "@/components/ui/form-schema";
import { useFigures, useQuantityInput } from "@/components/ui/display-settings";
import { QuantityField } from "@/components/ui/quantity-field";
import type { QuantityInput } from "@/lib/units/quantity-input";

const LABELS: Record<SetpointKey, string> = { hh: "HH", h: "H", l: "L", ll: "LL" };
// Highest first, as the sounding strip shows them.
const ORDER: SetpointKey[] = [...SETPOINT_KEYS].reverse();

/** One control per setpoint: absent, alarming, or kept with its values but silent. */
type Mode = "off" | "on" | "silent";

const MODE_WORDS: Record<Mode, string> = { off: "Not set", on: "On: alarms", silent: "Kept, not alarming" };

// The boxes sit where the API's body names them (setpoints.h.value), so its messages land beside them.
const rowSchema = z.object({ mode: z.enum(["off", "on", "silent"]), value: z.string(), deadband_m: z.string(), on_delay_s: z.string(), priority: z.string(), latching: z.boolean() });
const valuesSchema = z.object({
  unit: z.enum(["m", "pct"]),
  setpoints: z.object({ hh: rowSchema, h: rowSchema, l: rowSchema, ll: rowSchema }),
  rate_of_change: z.object({ mode: z.enum(["off", "on", "silent"]), limit_m_per_h: z.string(), priority: z.string() }),
});
type Row = z.infer<typeof rowSchema>;
type Values = z.infer<typeof valuesSchema>;

function modeOf(s: { enabled: boolean } | null): Mode {
  return s === null ? "off" : s.enabled ? "on" : "silent";
}

// Levels, deadbands and the leak limit are typed in the person's length unit (m or ft; "98 in" is read
// too) and sent in metres; a fill stays a percentage.
function initial(d: SetpointsJson, unit: "m" | "pct", qi: QuantityInput): Values {
  const rows = Object.fromEntries(
    SETPOINT_KEYS.map((key) => {
      const s = d.setpoints[key];
      const value = s ? (unit === "pct" ? s.fill_pct : s.value_m) : null;
      return [
        key,
        {
          mode: modeOf(s),
          value: value === null ? "" : unit === "pct" ? String(Number(value.toFixed(1))) : qi.text(value, "length"),
          deadband_m: qi.text(s?.deadband_m ?? d.defaults.deadband_m, "length"),
          on_delay_s: textOf(s?.on_delay_s ?? d.defaults.on_delay_s),
          priority: s?.priority ?? d.defaults.priorities[key],
          latching: s?.latching ?? false,
        },
      ];
    }),
  ) as Record<SetpointKey, Row>;
  const r = d.rate_of_change;
  return {
    unit,
    setpoints: rows,
    rate_of_change: { mode: modeOf(r), limit_m_per_h: qi.text(r?.limit_m_per_h, "length"), priority: r?.priority ?? d.defaults.priorities.rate_of_change },
  };
}

function payloadOf(v: Values, qi: QuantityInput) {
  const setpoints = Object.fromEntries(
    SETPOINT_KEYS.filter((k) => v.setpoints[k].mode !== "off").map((k) => {
      const r = v.setpoints[k];
      return [k, { value: v.unit === "m" ? qi.read(r.value, "length") : numberOrNull(r.value), deadband_m: qi.read(r.deadband_m, "length") ?? undefined, on_delay_s: numberOrNull(r.on_delay_s) ?? undefined, priority: r.priority, enabled: r.mode === "on", latching: r.latching }];
    }),
  );
  return {
    unit: v.unit,
    setpoints,
    rate_of_change: v.rate_of_change.mode !== "off" ? { limit_m_per_h: qi.read(v.rate_of_change.limit_m_per_h, "length"), priority: v.rate_of_change.priority, enabled: v.rate_of_change.mode === "on" } : null,
  };
}

// The schema reads through the form's own quantity input, which remembers the texts it wrote.
function setpointFormSchema(qi: QuantityInput) {
  return payloadSchema(valuesSchema, (v) => payloadOf(v, qi), putSetpointsSchema, (v, payload) => {
    const boxes: Record<string, string> = { "rate_of_change.limit_m_per_h": v.rate_of_change.limit_m_per_h };
    for (const k of SETPOINT_KEYS) {
      if (v.unit === "m") boxes[`setpoints.${k}.value`] = v.setpoints[k].value;
      boxes[`setpoints.${k}.deadband_m`] = v.setpoints[k].deadband_m;
    }
    return quantityIssues(qi, payload, boxes);
  });
}

function ModeField({ id, label, hint, ...select }: { id: string; label: string; hint?: string } & React.SelectHTMLAttributes<HTMLSelectElement>) {
  return (
    <SelectField id={id} label={label} hint={hint} className="sm:col-span-2" {...select}>
      {(Object.keys(MODE_WORDS) as Mode[]).map((m) => <option key={m} value={m}>{MODE_WORDS[m]}</option>)}
    </SelectField>
  );
}

function Check({ id, label, ...input }: { id: string; label: string } & React.InputHTMLAttributes<HTMLInputElement>) {
  return (
    <label htmlFor={id} className="flex items-center gap-2 text-sm">
      <input id={id} type="checkbox" {...input} />
      {label}
    </label>
  );
}

/** A tank's HH/H/L/LL setpoints and leak limit; read-only without `setpoint:edit`. */
export function AlarmSetpointForm({ assetId, editable }: { assetId: string; editable: boolean }) {
  const { data, error, isLoading, mutate } = useSWR<SetpointsJson>(`/api/assets/${assetId}/setpoints`, swrFetcher, { revalidateOnFocus: false });
  // Kept here: the fields start afresh from what was saved (their key changes), and the notice must outlive them.
  const [saved, setSaved] = useState(false);
  if (isLoading) return <Loading />;
  if (error) return <LoadError error={error} retry={() => mutate()} />;
  return data ? <SetpointFields key={JSON.stringify(data)} data={data} editable={editable} saved={saved} setSaved={setSaved} onSaved={(d) => mutate(d, { revalidate: false })} /> : null;
}

function SetpointFields({ data, editable, saved, setSaved, onSaved }: { data: SetpointsJson; editable: boolean; saved: boolean; setSaved: (v: boolean) => void; onSaved: (d: SetpointsJson) => void }) {
  const qi = useQuantityInput();
  const fig = useFigures();
  const schema = useMemo(() => setpointFormSchema(qi), [qi]);
  const form = useForm<Values, unknown, z.output<typeof schema>>({ resolver: zodResolver(schema), defaultValues: initial(data, "m", qi) });
  const { register, control, formState } = form;
  const [unit, rows, rocMode] = useWatch({ control, name: ["unit", "setpoints", "rate_of_change.mode"] });
  const errors = flatErrors(formState.errors);
  const busy = formState.isSubmitting;
  const { read, rest } = errorReader(errors);
  
  const onSubmit = form.handleSubmit(async (body) => {
    setSaved(false);
    try {
      onSaved(await fetchJson<SetpointsJson>(`/api/assets/${data.asset_id}/setpoints`, { method: "PUT", body: JSON.stringify(body) }));
      setSaved(true);
    } catch (e) {
      applyApiErrors(form, e);
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="card space-y-4 p-4">
      <p className="text-sm text-muted">
        Tank height <span className="figures">{fig.length(data.tank_height_m)}</span>, capacity <span className="figures">{fig.volume(data.capacity_l)}</span>.
        Levels are measured from the tank bottom; the order must be LL &lt; L &lt; H &lt; HH.
      </p>
      <fieldset className="flex gap-4 text-sm" disabled={!editable}>
        <legend className="label">Enter setpoints as</legend>
        {(["m", "pct"] as const).map((u) => (
          <label key={u} className="flex items-center gap-2">
            <input type="radio" name="setpoint-unit" value={u} checked={unit === u} onChange={() => form.reset(initial(data, u, qi))} />
            {u === "m" ? `level (${qi.symbolOf("length")})` : "fill (% of capacity)"}
          </label>
        ))}
      </fieldset>
      {ORDER.map((key) => {
        const r = rows[key];
        const id = (f: string) => `setpoint-${key}-${f}`;
        return (
          <fieldset key={key} className="grid gap-3 border-t border-rule pt-3 sm:grid-cols-6" disabled={!editable}>
            <legend className="sr-only">{LABELS[key]} setpoint</legend>
            <ModeField id={id("mode")} label={`${LABELS[key]} setpoint`} {...register(`setpoints.${key}.mode`)} hint={r.mode === "silent" ? "Its values are kept and shown on the sounding strip; it raises no alarm." : undefined} />
            <div className="hidden sm:col-span-4 sm:block" />
            {r.mode !== "off" && (
              <>
                {unit === "m" ? (
                  <QuantityField id={id("value")} label={LABELS[key]} input={qi} quantity="length" {...register(`setpoints.${key}.value`)} error={read(`setpoints.${key}.value`)} />
                ) : (
                  <NumberField id={id("value")} label={LABELS[key]} unit="% fill" {...register(`setpoints.${key}.value`)} error={read(`setpoints.${key}.value`)} />
                )}
                <QuantityField id={id("deadband")} label="Deadband" input={qi} quantity="length" {...register(`setpoints.${key}.deadband_m`)} error={read(`setpoints.${key}.deadband_m`)} />
                <NumberField id={id("delay")} label="On-delay" unit="s" {...register(`setpoints.${key}.on_delay_s`)} error={read(`setpoints.${key}.on_delay_s`)} />
                <SelectField id={id("priority")} label="Priority" {...register(`setpoints.${key}.priority`)} error={read(`setpoints.${key}.priority`)}>
                  {ALARM_PRIORITIES.map((p) => <option key={p} value={p}>{p}</option>)}
                </SelectField>
                <div className="flex flex-col justify-end sm:col-span-2">
                  <Check id={id("latching")} label="Latching (needs a reset after it clears)" {...register(`setpoints.${key}.latching`)} />
                </div>
              </>
            )}
          </fieldset>
        );
      })}
      <fieldset className="grid gap-3 border-t border-rule pt-3 sm:grid-cols-6" disabled={!editable}>
        <legend className="sr-only">Rate of change</legend>
        <ModeField id="setpoint-roc-mode" label="Leak alarm: level falling faster than a limit" {...register("rate_of_change.mode")} />
        <div className="hidden sm:col-span-4 sm:block" />
        {rocMode !== "off" && (
          <>
            <NumberField id="setpoint-roc-limit" label="Limit" unit={`${qi.symbolOf("length")}/h`} {...register("rate_of_change.limit_m_per_h")} error={read("rate_of_change.limit_m_per_h")} hint="Judged on the trend of the last hour (at least 30 min of readings)." className="sm:col-span-2" />
            <SelectField id="setpoint-roc-priority" label="Priority" {...register("rate_of_change.priority")}>
              {ALARM_PRIORITIES.map((p) => <option key={p} value={p}>{p}</option>)}
            </SelectField>
          </>
        )}
      </fieldset>
      <FormAlert errors={errors} rest={rest()} />
      {saved && <p role="status" className="text-sm">Setpoints saved.</p>}
      {editable && <button type="submit" className="btn" disabled={busy}>{busy ? "Saving…" : "Save setpoints"}</button>}
    </form>
  );
}
