"use client";

import { useMemo } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import type { z } from "zod";
import { fetchJson } from "@/lib/fetcher";
import { MAX_SHELVE_HOURS } from "@/lib/alarms/engine";
import { acknowledgeSchema, outOfServiceSchema, shelveSchema } from "@/lib/validations/alarm";
import { applyApiErrors, FormAlert, SelectField, TextAreaField, errorReader } from "@/components/ui/form-fields";
import { flatErrors, payloadSchema, textBoxes } from "@/components/ui/form-schema";
import { Dialog } from "@/components/ui/dialog";

// The dialogs behind Acknowledge (one or many, optional comment), Shelve for… (reason and how long,
// at most 24 h) and Take out of service (reason): each posts to the alarm API and reports back.

export type AlarmDialogMode = "acknowledge" | "shelve" | "out_of_service";

export const SHELVE_DURATIONS_MIN = [15, 30, 60, 120, 240, 480, 720, MAX_SHELVE_HOURS * 60] as const;

function durationWords(min: number): string {
  return min < 60 ? `${min} min` : `${min / 60} h`;
}

export interface BulkResult {
  acknowledged: { id: string }[];
  refused: { id: string; error: string; message: string }[];
}

const valuesSchema = textBoxes(["reason", "duration_min", "comment"]);
type Values = z.infer<typeof valuesSchema>;

/** The body each action's API takes, checked by its schema. */
function actionSchema(mode: AlarmDialogMode) {
  const comment = (v: Values) => (v.comment.trim() ? { comment: v.comment.trim() } : {});
  if (mode === "acknowledge") return payloadSchema(valuesSchema, comment, acknowledgeSchema);
  if (mode === "shelve") return payloadSchema(valuesSchema, (v) => ({ reason: v.reason, duration_min: Number(v.duration_min), ...comment(v) }), shelveSchema);
  return payloadSchema(valuesSchema, (v) => ({ reason: v.reason, ...comment(v) }), outOfServiceSchema);
}

async function submit(mode: AlarmDialogMode, ids: readonly string[], body: Record<string, unknown>): Promise<string | null> {
  if (mode === "acknowledge" && ids.length > 1) {
    const r = await fetchJson<BulkResult>("/api/alarms/acknowledge", { method: "POST", body: JSON.stringify({ ids, ...body }) });
    return r.refused.length ? `${r.acknowledged.length} acknowledged; ${r.refused.length} could not be: ${r.refused.map((x) => x.message).join(" ")}` : null;
  }
  const path = mode === "acknowledge" ? "acknowledge" : mode === "shelve" ? "shelve" : "out-of-service";
  await fetchJson(`/api/alarms/${ids[0]}/${path}`, { method: "POST", body: JSON.stringify(body) });
  return null;
}

/** A modal form for one action on one or more alarms; `onDone` runs after a successful post (with a partial-success note for bulk). */
export function AlarmActionDialog({ mode, ids, title, onClose, onDone }: { mode: AlarmDialogMode; ids: readonly string[]; title: string; onClose: () => void; onDone: (note: string | null) => void }) {
  const schema = useMemo(() => actionSchema(mode), [mode]);
  const form = useForm<Values, unknown, Record<string, unknown>>({ resolver: zodResolver(schema), defaultValues: { reason: "", duration_min: "60", comment: "" } });
  const { register, formState } = form;
  const errors = flatErrors(formState.errors);
  const busy = formState.isSubmitting || formState.isSubmitSuccessful;
  const { read, rest } = errorReader(errors);

  const onSubmit = form.handleSubmit(async (body) => {
    try {
      onDone(await submit(mode, ids, body));
    } catch (e) {
      applyApiErrors(form, e);
    }
  });

  const verb = mode === "acknowledge" ? "Acknowledge" : mode === "shelve" ? "Shelve" : "Take out of service";
  return (
    <Dialog title={title} onClose={onClose}>
      <form onSubmit={onSubmit} noValidate className="space-y-4">
        {mode !== "acknowledge" && (
          <TextAreaField
            id="alarm-dialog-reason"
            label="Reason"
            autoFocus
            rows={2}
            {...register("reason")}
            error={read("reason")}
            hint={mode === "shelve" ? "Why this alarm may stay silent for a while (it is still evaluated and logged)." : "Why the alarm is taken out of service."}
          />
        )}
        {mode === "shelve" && (
          <SelectField id="alarm-dialog-duration" label="For" {...register("duration_min")} error={read("duration_min")} hint={`At most ${MAX_SHELVE_HOURS} h; it returns by itself.`}>
            {SHELVE_DURATIONS_MIN.map((m) => <option key={m} value={m}>{durationWords(m)}</option>)}
          </SelectField>
        )}
        <TextAreaField
          id="alarm-dialog-comment"
          label="Comment (optional)"
          autoFocus={mode === "acknowledge"}
          rows={2}
          {...register("comment")}
          error={read("comment")}
        />
        <FormAlert errors={errors} rest={rest()} />
        <div className="flex gap-3">
          <button type="submit" className="btn" disabled={busy}>{busy ? "Saving…" : verb}</button>
          <button type="button" className="btn-quiet" onClick={onClose}>Cancel</button>
        </div>
      </form>
    </Dialog>
  );
}
