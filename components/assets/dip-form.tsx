"use client";

import { useMemo, useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import { fetchJson } from "@/lib/fetcher";
import { recordDipSchema, type RecordDipInput } from "@/lib/validations/dip";
import { applyApiErrors, InputField, TextAreaField } from "@/components/ui/form-fields";
import { useFigures, useQuantityInput } from "@/components/ui/display-settings";
import { QuantityField } from "@/components/ui/quantity-field";
import type { Figures } from "@/lib/format/figures";
import type { QuantityInput } from "@/lib/units/quantity-input";
import { dipLevelQuestion } from "@/lib/input-checks/questions";

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

/** The dip form's boxes read through the API's own schema: the level in the user's unit and decimal separator, the local time as an instant. */
function dipFormSchema(maxLevelM: number | null, qi: QuantityInput, fig: Figures) {
  return z
    .object({
      // What is not a length says why in the person's terms ("8 ft 3.5 in"), before the API's schema sees NaN.
      level: z.string().superRefine((text, ctx) => {
        const problem = qi.problem(text, "length");
        if (problem) ctx.addIssue({ code: "custom", message: problem });
      }),
      at: z.string(),
      note: z.string(),
    })
    .transform((v): z.input<typeof recordDipSchema> => ({
      level_m: qi.read(v.level, "length") ?? Number.NaN,
      at: Number.isNaN(new Date(v.at).getTime()) ? v.at : new Date(v.at).toISOString(),
      note: v.note.trim() || undefined,
    }))
    .pipe(recordDipSchema)
    .superRefine((d, ctx) => {
      const question = dipLevelQuestion(d.level_m, maxLevelM, (m) => fig.length(m));
      if (question) ctx.addIssue({ code: "custom", path: ["level"], message: question.message });
    });
}

type DipFormValues = { level: string; at: string; note: string };

export function DipForm({ assetId, maxLevelM, onRecorded }: { assetId: string; maxLevelM: number | null; onRecorded: () => void }) {
  const qi = useQuantityInput();
  const fig = useFigures();
  const schema = useMemo(() => dipFormSchema(maxLevelM, qi, fig), [maxLevelM, qi, fig]);
  const form = useForm<DipFormValues, unknown, RecordDipInput>({ resolver: zodResolver(schema), defaultValues: { level: "", at: localNow(), note: "" } });
  const { register, handleSubmit, formState: { errors, isSubmitting } } = form;
  const [saved, setSaved] = useState<string | null>(null);
  // The API's schema names the level level_m; the box is "level".
  const levelError = errors.level?.message ?? (errors as Record<string, { message?: string }>).level_m?.message;

  const onSubmit = handleSubmit(async (dip) => {
    setSaved(null);
    try {
      await fetchJson(`/api/assets/${assetId}/dips`, { method: "POST", body: JSON.stringify(dip) });
      form.reset({ level: "", at: localNow(), note: "" });
      setSaved(`Recorded a dip of ${fig.length(dip.level_m)}.`);
      onRecorded();
    } catch (err) {
      applyApiErrors(form, err);
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="card space-y-4 p-4" aria-labelledby="dip-form-title">
      <h2 id="dip-form-title" className="scroll-mt-4 text-lg font-bold">Record a dip</h2>
      <DipCaution />
      <div className="grid gap-4 sm:grid-cols-2">
        <QuantityField
          id="dip-level"
          label="Dipped level"
          input={qi}
          quantity="length"
          {...register("level")}
          error={levelError}
          hint={maxLevelM !== null ? `From the tank bottom; at most ${fig.length(maxLevelM)}.` : "From the tank bottom."}
          required
        />
        <InputField id="dip-at" label="Time of the dip" type="datetime-local" {...register("at")} error={errors.at?.message} hint="Your device's local time." required />
      </div>
      <TextAreaField id="dip-note" label="Note" rows={2} {...register("note")} error={errors.note?.message} hint="Tape or dipstick, who was with you, anything unusual." />
      {errors.root && <p role="alert" className="field-error">{errors.root.message}</p>}
      {saved && <p role="status" className="text-sm">{saved}</p>}
      <button type="submit" className="btn" disabled={isSubmitting}>{isSubmitting ? "Recording…" : "Record the dip"}</button>
    </form>
  );
}
