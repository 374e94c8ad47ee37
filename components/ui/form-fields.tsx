"use client";

import Link from "next/link";
import { useEffect } from "react";
import type { FieldValues, Path, PathValue, UseFormReturn } from "react-hook-form";
import { ApiError } from "@/lib/fetcher";

// The kit's form pieces: labelled fields with their hint and error, the form's alert, the API's answers
// put beside the fields they name. Forms hold their state in react-hook-form with a schema from
// ./form-schema; every number box is a NumberField, so a unit or locale applies to all of them at once.

export type FieldErrors = Record<string, string>;

export { numberOrNull } from "@/components/ui/decimal";

export function textOf(value: number | string | null | undefined): string {
  return value == null ? "" : String(value);
}

/** The API's per-field messages on 422, or its one message under "_". */
export function errorsFromApi(e: unknown): FieldErrors {
  if (e instanceof ApiError && e.fields && Object.keys(e.fields).length) return e.fields;
  return { _: (e as Error).message };
}

/**
 * Puts the API's 422 field messages on the form's fields, anything else on the form as a whole;
 * `fieldOf` renames an API path to the form's where they differ.
 */
export function applyApiErrors<T extends FieldValues>(form: Pick<UseFormReturn<T>, "setError">, e: unknown, fieldOf: (key: string) => string = (key) => key) {
  const errors = errorsFromApi(e);
  for (const [key, message] of Object.entries(errors)) {
    form.setError(key === "_" ? "root" : (fieldOf(key) as Path<T>), { message });
  }
}

/**
 * A select whose options arrive after the form was drawn (sites, assets) shows the form's value once they
 * do: the browser could not select an option that did not exist yet.
 */
export function useSelectsFollowOptions<T extends FieldValues>(form: Pick<UseFormReturn<T>, "getValues" | "setValue">, names: readonly Path<T>[], options: unknown) {
  const { getValues, setValue } = form;
  const key = names.join(" ");
  useEffect(() => {
    if (!options) return;
    for (const name of key.split(" ")) setValue(name as Path<T>, getValues(name as Path<T>) as PathValue<T, Path<T>>);
  }, [options, key, getValues, setValue]);
}

/** After a save, every cached list or record under this API path is fetched again. */
export function isUnder(path: string) {
  return (key: unknown) => typeof key === "string" && (key === path || key.startsWith(`${path}/`) || key.startsWith(`${path}?`));
}

/** Field keys ("geometry.diameter_m") become element ids. */
export function fieldId(form: string, key: string): string {
  return `${form}-${key.replace(/[^A-Za-z0-9_-]/g, "-")}`;
}

type FieldProps = { id: string; label: string; error?: string; hint?: React.ReactNode; unit?: string; className?: string };

function Described({ id, error, hint }: Pick<FieldProps, "id" | "error" | "hint">) {
  return (
    <>
      {hint && <p id={`${id}-hint`} className="mt-1 text-xs text-muted">{hint}</p>}
      {error && <p id={`${id}-error`} className="field-error">{error}</p>}
    </>
  );
}

function describedBy(id: string, error?: string, hint?: React.ReactNode): string | undefined {
  return [hint ? `${id}-hint` : "", error ? `${id}-error` : ""].filter(Boolean).join(" ") || undefined;
}

export function InputField({ id, label, error, hint, unit, className, ...input }: FieldProps & React.InputHTMLAttributes<HTMLInputElement>) {
  return (
    <div className={className}>
      <label htmlFor={id} className="label">{label}{unit && <span className="font-normal text-muted"> ({unit})</span>}</label>
      <input id={id} className={input.inputMode === "decimal" ? "field figures" : "field"} aria-invalid={error ? true : undefined} aria-describedby={describedBy(id, error, hint)} {...input} />
      <Described id={id} error={error} hint={hint} />
    </div>
  );
}

/**
 * A number box in a unit, in tabular digits. A text box with the decimal keypad rather than type="number",
 * whose parsing depends on the browser's locale: the form reads it with parseDecimal ("2,1" is 2.1).
 */
export function NumberField({ step: _step, ...props }: FieldProps & Omit<React.InputHTMLAttributes<HTMLInputElement>, "type">) {
  return <InputField type="text" inputMode="decimal" autoComplete="off" {...props} />;
}

export function SelectField({ id, label, error, hint, className, children, ...select }: FieldProps & React.SelectHTMLAttributes<HTMLSelectElement>) {
  return (
    <div className={className}>
      <label htmlFor={id} className="label">{label}</label>
      <select id={id} className="field" aria-invalid={error ? true : undefined} aria-describedby={describedBy(id, error, hint)} {...select}>
        {children}
      </select>
      <Described id={id} error={error} hint={hint} />
    </div>
  );
}

export function TextAreaField({ id, label, error, hint, className, ...area }: FieldProps & React.TextareaHTMLAttributes<HTMLTextAreaElement>) {
  return (
    <div className={className}>
      <label htmlFor={id} className="label">{label}</label>
      <textarea id={id} className="field figures" aria-invalid={error ? true : undefined} aria-describedby={describedBy(id, error, hint)} {...area} />
      <Described id={id} error={error} hint={hint} />
    </div>
  );
}

/**
 * Collects which error keys a form shows beside its fields, so the alert at the end of the form can list
 * the rest (a rule that spans several fields, a server message) instead of hiding them.
 */
export function errorReader(errors: FieldErrors) {
  const shown = new Set<string>(["_"]);
  const read = (key: string): string | undefined => {
    shown.add(key);
    return errors[key];
  };
  const rest = () => Object.entries(errors).filter(([key]) => !shown.has(key)).map(([, message]) => message);
  return { read, rest };
}

export function FormAlert({ errors, rest }: { errors: FieldErrors; rest: string[] }) {
  if (!Object.keys(errors).length) return null;
  const lines = [errors._ ?? "Not saved: correct the fields marked below.", ...rest];
  return (
    <div role="alert" className="border-l-4 border-critical bg-card px-3 py-2 text-sm">
      {lines.map((line) => <p key={line}>{line}</p>)}
    </div>
  );
}

export function FormButtons({ busy, label, cancelHref }: { busy: boolean; label: string; cancelHref: string }) {
  return (
    <div className="flex flex-wrap gap-3">
      <button type="submit" className="btn" disabled={busy}>{busy ? "Saving…" : label}</button>
      <Link href={cancelHref} className="btn-quiet">Cancel</Link>
    </div>
  );
}

// Lists draw through DataTable; the stacked layout is re-exported for screens not yet converted.
export { STACKED_TABLE } from "@/components/ui/data-table";

export function NotFoundPanel({ what, backHref, backLabel }: { what: string; backHref: string; backLabel: string }) {
  return (
    <div className="card p-6">
      <h1 className="mb-2 text-2xl font-bold">{what} not found</h1>
      <p className="mb-6">There is no such {what.toLowerCase()}, or it belongs to another organisation.</p>
      <Link href={backHref} className="btn-quiet">{backLabel}</Link>
    </div>
  );
}
