"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { fetchJson } from "@/lib/fetcher";
import { CLOCK_LABELS, CLOCKS, DECIMAL_SEPARATOR_LABELS, DECIMAL_SEPARATORS, UNIT_SYSTEM_LABELS, UNIT_SYSTEMS, type DisplaySettings } from "@/lib/format/display";
import type { DisplaySettingsView } from "@/lib/services/display-settings";
import { errorsFromApi, FormAlert, SelectField, type FieldErrors } from "@/components/ui/form-fields";

type Key = keyof DisplaySettings;
const FIELDS: { key: Key; label: string; choices: readonly string[]; words: Record<string, string> }[] = [
  { key: "unit_system", label: "Units", choices: UNIT_SYSTEMS, words: UNIT_SYSTEM_LABELS },
  { key: "decimal_separator", label: "Decimal separator", choices: DECIMAL_SEPARATORS, words: DECIMAL_SEPARATOR_LABELS },
  { key: "clock", label: "Clock", choices: CLOCKS, words: CLOCK_LABELS },
];

// "" in a select of one's own settings stands for null: follow the organisation.
const FOLLOW = "";

function SettingsForm({ title, legend, url, initial, follow, editable }: {
  title: string;
  legend: string;
  url: string;
  initial: Record<Key, string | null>;
  /** The organisation's settings, for the "organisation's" choice of a user's own. */
  follow?: DisplaySettings;
  editable: boolean;
}) {
  const router = useRouter();
  const [values, setValues] = useState(() => Object.fromEntries(FIELDS.map((f) => [f.key, initial[f.key] ?? FOLLOW])) as Record<Key, string>);
  const [errors, setErrors] = useState<FieldErrors>({});
  const [busy, setBusy] = useState(false);
  const [saved, setSaved] = useState(false);
  const prefix = follow ? "own" : "organisation";

  async function onSubmit(event: React.FormEvent) {
    event.preventDefault();
    setBusy(true);
    setSaved(false);
    try {
      const body = Object.fromEntries(FIELDS.map((f) => [f.key, values[f.key] === FOLLOW ? null : values[f.key]]));
      await fetchJson(url, { method: "PATCH", body: JSON.stringify(body) });
      setErrors({});
      setSaved(true);
      // The shell resolves the settings again, so every figure on every screen follows at once.
      router.refresh();
    } catch (e) {
      setErrors(errorsFromApi(e));
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={onSubmit} noValidate className="card max-w-xl space-y-4 p-4" aria-labelledby={`${prefix}-title`}>
      <h2 id={`${prefix}-title`} className="text-lg font-bold">{title}</h2>
      <p className="text-sm text-muted">{legend}</p>
      <fieldset className="grid gap-4 sm:grid-cols-3" disabled={!editable}>
        {FIELDS.map((f) => (
          <SelectField key={f.key} id={`${prefix}-${f.key}`} label={f.label} value={values[f.key]} error={errors[f.key]} onChange={(e) => setValues((v) => ({ ...v, [f.key]: e.target.value }))}>
            {follow && <option value={FOLLOW}>Organisation&apos;s: {f.words[follow[f.key]]}</option>}
            {f.choices.map((c) => <option key={c} value={c}>{f.words[c]}</option>)}
          </SelectField>
        ))}
      </fieldset>
      <FormAlert errors={errors} rest={[]} />
      {editable && (
        <div className="flex items-center gap-3">
          <button type="submit" className="btn" disabled={busy}>{busy ? "Saving…" : "Save"}</button>
          {saved && <p role="status" className="text-sm">Saved. Figures and times now follow these settings.</p>}
        </div>
      )}
    </form>
  );
}

/** The organisation's settings (admins change them) and the signed-in person's own. */
export function DisplaySettingsForms({ view, canManageOrganisation }: { view: DisplaySettingsView; canManageOrganisation: boolean }) {
  return (
    <div className="space-y-6">
      <SettingsForm
        title="Your own"
        legend="What you read figures and times in. Leave a setting at the organisation's to follow it when an admin changes it."
        url="/api/me/display-settings"
        initial={view.own}
        follow={view.organisation}
        editable
      />
      <SettingsForm
        title="Organisation"
        legend={canManageOrganisation ? "What everyone in the organisation reads unless they choose their own; e-mails to on-call addresses follow it." : "Set by an admin; what everyone reads unless they choose their own."}
        url="/api/organisation/display-settings"
        initial={view.organisation}
        editable={canManageOrganisation}
      />
      <p className="max-w-xl text-sm text-muted">
        Forms read what you type in these units and decimal separator (8 ft 3.5 in, 2,45 m, 300 gal) and store SI. The APIs and
        their documents always speak SI: metres, litres, degrees Celsius.
      </p>
    </div>
  );
}
