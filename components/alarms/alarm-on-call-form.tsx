"use client";

import useSWR from "swr";
import { useState } from "react";
import { useFieldArray, useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import type { OnCallJson } from "@/lib/services/on-call";
import { putOnCallSchema } from "@/lib/validations/on-call";
import { Loading, LoadError } from "@/components/ui/data-state";
import { applyApiErrors, errorReader, FormAlert } from "@/components/ui/form-fields";
import { flatErrors, payloadSchema } from "@/components/ui/form-schema";

// The list as the form holds it (react-hook-form's field arrays hold objects), read into the API's body.
const valuesSchema = z.object({ user_ids: z.array(z.object({ user_id: z.string() })) });
type Values = z.infer<typeof valuesSchema>;
const onCallFormSchema = payloadSchema(valuesSchema, (v) => ({ user_ids: v.user_ids.map((p) => p.user_id) }), putOnCallSchema);

/** A site's on-call list in escalation order: add people, move them up or down, remove them, save. */
export function AlarmOnCallForm({ siteId, editable }: { siteId: string; editable: boolean }) {
  const { data, error, isLoading, mutate } = useSWR<OnCallJson>(`/api/sites/${siteId}/on-call`, swrFetcher, { revalidateOnFocus: false });
  // Kept here: the list starts afresh from what was saved (its key changes), and the notice must outlive it.
  const [saved, setSaved] = useState(false);
  if (isLoading) return <Loading />;
  if (error) return <LoadError error={error} retry={() => mutate()} />;
  return data ? <OnCallFields key={JSON.stringify(data.entries)} data={data} editable={editable} saved={saved} setSaved={setSaved} onSaved={(d) => mutate(d, { revalidate: false })} /> : null;
}

function OnCallFields({ data, editable, saved, setSaved, onSaved }: { data: OnCallJson; editable: boolean; saved: boolean; setSaved: (v: boolean) => void; onSaved: (d: OnCallJson) => void }) {
  const form = useForm<Values, unknown, z.output<typeof onCallFormSchema>>({
    resolver: zodResolver(onCallFormSchema),
    defaultValues: { user_ids: data.entries.map((e) => ({ user_id: e.user_id })) },
  });
  const list = useFieldArray({ control: form.control, name: "user_ids" });
  const ids = list.fields.map((f) => f.user_id);
  const [adding, setAdding] = useState("");
  const errors = flatErrors(form.formState.errors);
  const { read, rest } = errorReader(errors);
  const busy = form.formState.isSubmitting;
  const people = new Map<string, { email: string | null; name: string; role: string }>();
  for (const e of data.entries) people.set(e.user_id, { email: e.email, name: e.name, role: e.role });
  for (const c of data.candidates ?? []) people.set(c.id, { email: c.email, name: c.name, role: c.role });
  const addable = (data.candidates ?? []).filter((c) => !ids.includes(c.id));

  const save = form.handleSubmit(async (body) => {
    setSaved(false);
    try {
      onSaved(await fetchJson<OnCallJson>(`/api/sites/${data.site_id}/on-call`, { method: "PUT", body: JSON.stringify(body) }));
      setSaved(true);
    } catch (e) {
      applyApiErrors(form, e);
    }
  });

  return (
    <form className="card max-w-2xl space-y-4 p-4" onSubmit={save} noValidate aria-label="On-call list">
      <p className="text-sm text-muted">
        The first person is e-mailed when an alarm activates; if nobody acknowledges within <span className="figures">{data.escalation_delay_min} min</span> (the
        site&apos;s escalation delay), the next one is, and so on down the list.
      </p>
      {ids.length === 0 ? (
        <p className="text-sm">Nobody is on call: alarms at this site are shown on screen but not e-mailed.</p>
      ) : (
        <ol className="space-y-2" aria-label="On call, in escalation order">
          {list.fields.map(({ id: key, user_id: id }, i) => {
            const p = people.get(id);
            const error = read(`user_ids.${i}`) ?? read(`user_ids.${i}.user_id`);
            return (
              <li key={key} className="flex flex-wrap items-center gap-3 border-b border-rule pb-2">
                <span className="figures w-6 text-right">{i + 1}.</span>
                <span className="min-w-0 flex-1">
                  <span className="font-bold">{p?.name || p?.email}</span> <span className="text-muted">{p?.email} · {p?.role}</span>
                  {error && <span className="field-error block">{error}</span>}
                </span>
                {editable && (
                  <span className="flex gap-2">
                    <button type="button" className="btn-quiet md:h-8 px-3" disabled={i === 0} onClick={() => list.swap(i, i - 1)} aria-label={`Move ${p?.email} up`}>Up</button>
                    <button type="button" className="btn-quiet md:h-8 px-3" disabled={i === ids.length - 1} onClick={() => list.swap(i, i + 1)} aria-label={`Move ${p?.email} down`}>Down</button>
                    <button type="button" className="btn-quiet md:h-8 px-3" onClick={() => list.remove(i)} aria-label={`Remove ${p?.email}`}>Remove</button>
                  </span>
                )}
              </li>
            );
          })}
        </ol>
      )}
      {editable && (
        <>
          <div className="flex flex-wrap items-end gap-3">
            <div className="min-w-64 flex-1">
              <label htmlFor="on-call-add" className="label">Add a person</label>
              <select id="on-call-add" className="field" value={adding} onChange={(e) => setAdding(e.target.value)}>
                <option value="">Choose…</option>
                {addable.map((c) => <option key={c.id} value={c.id}>{c.name ? `${c.name} (${c.email})` : c.email} · {c.role}</option>)}
              </select>
            </div>
            <button type="button" className="btn-quiet" disabled={!adding} onClick={() => { list.append({ user_id: adding }); setAdding(""); }}>Add</button>
          </div>
          <FormAlert errors={errors} rest={rest()} />
          {saved && <p role="status" className="text-sm">On-call list saved.</p>}
          <button type="submit" className="btn" disabled={busy}>{busy ? "Saving…" : "Save the list"}</button>
        </>
      )}
    </form>
  );
}
