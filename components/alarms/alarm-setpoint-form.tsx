"use client";

import useSWR from "swr";
import { useState } from "react";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import { fieldErrors } from "@/lib/http/errors";
import { SETPOINT_KEYS, type SetpointKey } from "@/lib/alarms/setpoints";
import { ALARM_PRIORITIES } from "@/lib/alarms/state-machine";
import type { SetpointsJson } from "@/lib/services/alarm-setpoints";
import { putSetpointsSchema } from "@/lib/validations/setpoint";
import { Loading, LoadError } from "@/components/ui/data-state";
import { errorReader, errorsFromApi, FormAlert, NumberField, SelectField, numberOrNull, textOf, type FieldErrors } from "@/components/ui/form-fields";
import { useFigures, useQuantityInput } from "@/components/ui/display-settings";
import { QuantityField } from "@/components/ui/quantity-field";
import type { QuantityInput } from "@/lib/units/quantity-input";

const LABELS: Record<SetpointKey, string> = { hh: "HH", h: "H", l: "L", ll: "LL" };
// Highest first, as the sounding strip shows them.
const ORDER: SetpointKey[] = [...SETPOINT_KEYS].reverse();

/** One control per setpoint: absent, alarming, or kept with its values but silent. */
type Mode = "off" | "on" | "silent";

const MODE_WORDS: Record<Mode, string> = { off: "Not set", on: "On: alarms", silent: "Kept, not alarming" };

interface Row {
  mode: Mode;
  value: string;
  deadband_m: string;
  on_delay_s: string;
  priority: string;
  latching: boolean;
}

interface Values {
  unit: "m" | "pct";
  rows: Record<SetpointKey, Row>;
  roc: { mode: Mode; limit: string; priority: string };
}

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
    rows,
    roc: { mode: modeOf(r), limit: qi.text(r?.limit_m_per_h, "length"), priority: r?.priority ?? d.defaults.priorities.rate_of_change },
  };
}

function payloadOf(v: Values, qi: QuantityInput) {
  const setpoints = Object.fromEntries(
    SETPOINT_KEYS.filter((k) => v.rows[k].mode !== "off").map((k) => {
      const r = v.rows[k];
      return [k, { value: v.unit === "m" ? qi.read(r.value, "length") : numberOrNull(r.value), deadband_m: qi.read(r.deadband_m, "length") ?? undefined, on_delay_s: numberOrNull(r.on_delay_s) ?? undefined, priority: r.priority, enabled: r.mode === "on", latching: r.latching }];
    }),
  );
  return {
    unit: v.unit,
    setpoints,
    rate_of_change: v.roc.mode !== "off" ? { limit_m_per_h: qi.read(v.roc.limit, "length"), priority: v.roc.priority, enabled: v.roc.mode === "on" } : null,
  };
}

function ModeField({ id, label, mode, onChange, hint }: { id: string; label: string; mode: Mode; onChange: (m: Mode) => void; hint?: string }) {
  return (
    <SelectField id={id} label={label} value={mode} onChange={(e) => onChange(e.target.value as Mode)} hint={hint} className="sm:col-span-2">
      {(Object.keys(MODE_WORDS) as Mode[]).map((m) => <option key={m} value={m}>{MODE_WORDS[m]}</option>)}
    </SelectField>
  );
}

function Check({ id, label, checked, onChange, disabled }: { id: string; label: string; checked: boolean; onChange: (v: boolean) => void; disabled?: boolean }) {
  return (
    <label htmlFor={id} className="flex items-center gap-2 text-sm">
      <input id={id} type="checkbox" checked={checked} disabled={disabled} onChange={(e) => onChange(e.target.checked)} />
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
  const [values, setValues] = useState<Values>(() => initial(data, "m", qi));
  const [errors, setErrors] = useState<FieldErrors>({});
  const [busy, setBusy] = useState(false);
  const { read, rest } = errorReader(errors);
  const setRow = (key: SetpointKey, patch: Partial<Row>) => setValues((v) => ({ ...v, rows: { ...v.rows, [key]: { ...v.rows[key], ...patch } } }));

  async function onSubmit(event: React.FormEvent) {
    event.preventDefault();
    setSaved(false);
    const parsed = putSetpointsSchema.safeParse(payloadOf(values, qi));
    if (!parsed.success) return setErrors(fieldErrors(parsed.error));
    setErrors({});
    setBusy(true);
    try {
      onSaved(await fetchJson<SetpointsJson>(`/api/assets/${data.asset_id}/setpoints`, { method: "PUT", body: JSON.stringify(parsed.data) }));
      setSaved(true);
    } catch (e) {
      setErrors(errorsFromApi(e));
    } finally {
      setBusy(false);
    }
  }

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
            <input type="radio" name="setpoint-unit" value={u} checked={values.unit === u} onChange={() => setValues(initial(data, u, qi))} />
            {u === "m" ? `level (${qi.symbolOf("length")})` : "fill (% of capacity)"}
          </label>
        ))}
      </fieldset>
      {ORDER.map((key) => {
        const r = values.rows[key];
        const id = (f: string) => `setpoint-${key}-${f}`;
        return (
          <fieldset key={key} className="grid gap-3 border-t border-rule pt-3 sm:grid-cols-6" disabled={!editable}>
            <legend className="sr-only">{LABELS[key]} setpoint</legend>
            <ModeField id={id("mode")} label={`${LABELS[key]} setpoint`} mode={r.mode} onChange={(mode) => setRow(key, { mode })} hint={r.mode === "silent" ? "Its values are kept and shown on the sounding strip; it raises no alarm." : undefined} />
            <div className="hidden sm:col-span-4 sm:block" />
            {r.mode !== "off" && (
              <>
                {values.unit === "m" ? (
                  <QuantityField id={id("value")} label={LABELS[key]} input={qi} quantity="length" value={r.value} onChange={(e) => setRow(key, { value: e.target.value })} error={read(`setpoints.${key}.value`)} />
                ) : (
                  <NumberField id={id("value")} label={LABELS[key]} unit="% fill" value={r.value} onChange={(e) => setRow(key, { value: e.target.value })} error={read(`setpoints.${key}.value`)} />
                )}
                <QuantityField id={id("deadband")} label="Deadband" input={qi} quantity="length" value={r.deadband_m} onChange={(e) => setRow(key, { deadband_m: e.target.value })} error={read(`setpoints.${key}.deadband_m`)} />
                <NumberField id={id("delay")} label="On-delay" unit="s" step={1} value={r.on_delay_s} onChange={(e) => setRow(key, { on_delay_s: e.target.value })} error={read(`setpoints.${key}.on_delay_s`)} />
                <SelectField id={id("priority")} label="Priority" value={r.priority} onChange={(e) => setRow(key, { priority: e.target.value })} error={read(`setpoints.${key}.priority`)}>
                  {ALARM_PRIORITIES.map((p) => <option key={p} value={p}>{p}</option>)}
                </SelectField>
                <div className="flex flex-col justify-end sm:col-span-2">
                  <Check id={id("latching")} label="Latching (needs a reset after it clears)" checked={r.latching} onChange={(latching) => setRow(key, { latching })} />
                </div>
              </>
            )}
          </fieldset>
        );
      })}
      <fieldset className="grid gap-3 border-t border-rule pt-3 sm:grid-cols-6" disabled={!editable}>
        <legend className="sr-only">Rate of change</legend>
        <ModeField id="setpoint-roc-mode" label="Leak alarm: level falling faster than a limit" mode={values.roc.mode} onChange={(mode) => setValues((v) => ({ ...v, roc: { ...v.roc, mode } }))} />
        <div className="hidden sm:col-span-4 sm:block" />
        {values.roc.mode !== "off" && (
          <>
            <NumberField id="setpoint-roc-limit" label="Limit" unit={`${qi.symbolOf("length")}/h`} value={values.roc.limit} onChange={(e) => setValues((v) => ({ ...v, roc: { ...v.roc, limit: e.target.value } }))} error={read("rate_of_change.limit_m_per_h")} hint="Judged on the trend of the last hour (at least 30 min of readings)." className="sm:col-span-2" />
            <SelectField id="setpoint-roc-priority" label="Priority" value={values.roc.priority} onChange={(e) => setValues((v) => ({ ...v, roc: { ...v.roc, priority: e.target.value } }))}>
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
