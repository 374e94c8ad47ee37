"use client";

import { useState } from "react";
import { fetchJson } from "@/lib/fetcher";
import { MAX_SHELVE_HOURS } from "@/lib/alarms/engine";
import { acknowledgeSchema, outOfServiceSchema, shelveSchema } from "@/lib/validations/alarm";
import { errorsFromApi, FormAlert, SelectField, TextAreaField, errorReader, type FieldErrors } from "@/components/ui/form-fields";
import { fieldErrors } from "@/lib/http/errors";
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
  const [comment, setComment] = useState("");
  const [reason, setReason] = useState("");
  const [duration, setDuration] = useState<string>("60");
  const [errors, setErrors] = useState<FieldErrors>({});
  const [busy, setBusy] = useState(false);
  const { read, rest } = errorReader(errors);

  async function onSubmit(event: React.FormEvent) {
    event.preventDefault();
    const c = comment.trim() ? { comment: comment.trim() } : {};
    const parsed =
      mode === "acknowledge"
        ? acknowledgeSchema.safeParse(c)
        : mode === "shelve"
          ? shelveSchema.safeParse({ reason, duration_min: Number(duration), ...c })
          : outOfServiceSchema.safeParse({ reason, ...c });
    if (!parsed.success) return setErrors(fieldErrors(parsed.error));
    setErrors({});
    setBusy(true);
    try {
      onDone(await submit(mode, ids, parsed.data));
    } catch (e) {
      setErrors(errorsFromApi(e));
      setBusy(false);
    }
  }

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
            value={reason}
            onChange={(e) => setReason(e.target.value)}
            error={read("reason")}
            hint={mode === "shelve" ? "Why this alarm may stay silent for a while (it is still evaluated and logged)." : "Why the alarm is taken out of service."}
          />
        )}
        {mode === "shelve" && (
          <SelectField id="alarm-dialog-duration" label="For" value={duration} onChange={(e) => setDuration(e.target.value)} error={read("duration_min")} hint={`At most ${MAX_SHELVE_HOURS} h; it returns by itself.`}>
            {SHELVE_DURATIONS_MIN.map((m) => <option key={m} value={m}>{durationWords(m)}</option>)}
          </SelectField>
        )}
        <TextAreaField
          id="alarm-dialog-comment"
          label="Comment (optional)"
          autoFocus={mode === "acknowledge"}
          rows={2}
          value={comment}
          onChange={(e) => setComment(e.target.value)}
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
