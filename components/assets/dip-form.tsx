"use client";

import { useState } from "react";
import { fetchJson } from "@/lib/fetcher";
import { recordDipSchema } from "@/lib/validations/dip";
import { describeZodError } from "@/lib/http/errors";
import { errorReader, errorsFromApi, FormAlert, InputField, NumberField, TextAreaField, type FieldErrors } from "@/components/ui/form-fields";

/** The moment now as a datetime-local value in the browser's zone (YYYY-MM-DDTHH:mm). */
export function localNow(now = new Date()): string {
  const pad = (n: number) => String(n).padStart(2, "0");
  return `${now.getFullYear()}-${pad(now.getMonth() + 1)}-${pad(now.getDate())}T${pad(now.getHours())}:${pad(now.getMinutes())}`;
}

/** The safety reminder the manual-dip form carries (PRODUCT.md "Alarms"). */
export function DipCaution() {
  return (
    <p role="note" className="border-l-4 border-rule bg-card px-3 py-2 text-sm text-muted">
      <span className="font-bold text-ink">Caution: </span>
      tank-top work and confined spaces follow the site&apos;s safety rules. Do not open or enter a tank to take a dip unless
      those rules allow it and the permits they ask for are in place.
    </p>
  );
}

export function DipForm({ assetId, maxLevelM, onRecorded }: { assetId: string; maxLevelM: number | null; onRecorded: () => void }) {
  const [level, setLevel] = useState("");
  const [at, setAt] = useState(() => localNow());
  const [note, setNote] = useState("");
  const [errors, setErrors] = useState<FieldErrors>({});
  const [busy, setBusy] = useState(false);
  const [saved, setSaved] = useState<string | null>(null);
  const { read, rest } = errorReader(errors);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setSaved(null);
    const when = new Date(at);
    const body = { level_m: level.trim() === "" ? Number.NaN : Number(level), at: Number.isNaN(when.getTime()) ? at : when.toISOString(), note: note.trim() || undefined };
    const parsed = recordDipSchema.safeParse(body);
    if (!parsed.success) {
      const fields: FieldErrors = {};
      for (const issue of parsed.error.issues) fields[String(issue.path[0] ?? "_")] ??= issue.message;
      setErrors(Object.keys(fields).length ? fields : { _: describeZodError(parsed.error) });
      return;
    }
    if (maxLevelM !== null && parsed.data.level_m > maxLevelM) {
      setErrors({ level_m: `The tank is ${maxLevelM.toFixed(3)} m tall; a dip cannot read higher.` });
      return;
    }
    setBusy(true);
    try {
      await fetchJson(`/api/assets/${assetId}/dips`, { method: "POST", body: JSON.stringify(parsed.data) });
      setErrors({});
      setLevel("");
      setNote("");
      setSaved(`Recorded a dip of ${parsed.data.level_m.toFixed(3)} m.`);
      onRecorded();
    } catch (err) {
      setErrors(errorsFromApi(err));
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={submit} noValidate className="card space-y-4 p-4" aria-labelledby="dip-form-title">
      <h2 id="dip-form-title" className="text-lg font-bold">Record a dip</h2>
      <DipCaution />
      <div className="grid gap-4 sm:grid-cols-2">
        <NumberField
          id="dip-level"
          label="Dipped level"
          unit="m"
          value={level}
          onChange={(e) => setLevel(e.target.value)}
          error={read("level_m")}
          hint={maxLevelM !== null ? `From the tank bottom; at most ${maxLevelM.toFixed(3)} m.` : "From the tank bottom."}
          min={0}
          required
        />
        <InputField id="dip-at" label="Time of the dip" type="datetime-local" value={at} onChange={(e) => setAt(e.target.value)} error={read("at")} hint="Your device's local time." required />
      </div>
      <TextAreaField id="dip-note" label="Note" rows={2} value={note} onChange={(e) => setNote(e.target.value)} error={read("note")} hint="Tape or dipstick, who was with you, anything unusual." />
      <FormAlert errors={errors} rest={rest()} />
      {saved && <p role="status" className="text-sm">{saved}</p>}
      <button type="submit" className="btn" disabled={busy}>{busy ? "Recording…" : "Record the dip"}</button>
    </form>
  );
}
