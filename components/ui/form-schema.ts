import { z } from "zod";
import type { FieldErrors as HookFormErrors, FieldValues } from "react-hook-form";
import type { FieldErrors } from "@/components/ui/form-fields";
import type { QuantityInput } from "@/lib/units/quantity-input";
import type { Quantity } from "@/lib/units/units";

// Forms keep what people typed (text, the decimal separator they use) and send what the API takes. The
// schema a form validates with reads its text into the API's payload and checks that payload with the
// API's own zod schema (lib/validations), so the form and the route handler cannot disagree.

export const NOT_A_NUMBER = "Type a number, such as 2.5 or 2,5.";

function valueAt(payload: unknown, path: readonly PropertyKey[]): unknown {
  return path.reduce<unknown>((v, key) => (v != null && typeof v === "object" ? (v as Record<PropertyKey, unknown>)[key] : undefined), payload);
}

/** A form's text boxes by name: each holds a string as typed. */
export function textBoxes<K extends string>(names: readonly K[]) {
  return z.object(Object.fromEntries(names.map((name) => [name, z.string()])) as Record<K, z.ZodString>);
}

export type FormIssue = { path: string; message: string };

/**
 * The form's schema: `values` (plain text boxes, never failing) → `toPayload` → the API's `api` schema.
 * Every issue is reported at once on the path the API names; a number box whose text is no number
 * (NaN in the payload) says so instead of the API's wording. `check` adds what only the form knows
 * ("Choose the site." for an empty choice, a strapping row it could not read); on the same field its
 * message comes first.
 */
export function payloadSchema<V extends object, S extends z.ZodType>(
  values: z.ZodType<V, V>,
  toPayload: (v: V) => unknown,
  api: S,
  check?: (v: V, payload: unknown) => FormIssue[],
) {
  return values.transform((v, ctx): z.output<S> => {
    const payload = toPayload(v);
    const parsed = api.safeParse(payload);
    const own = check?.(v, payload) ?? [];
    for (const issue of own) ctx.addIssue({ code: "custom", path: issue.path.split("."), message: issue.message });
    if (parsed.success) return own.length ? z.NEVER : parsed.data;
    for (const issue of parsed.error.issues) {
      const message = Number.isNaN(valueAt(payload, issue.path)) ? NOT_A_NUMBER : issue.message;
      ctx.addIssue({ code: "custom", path: issue.path as PropertyKey[], message });
    }
    return z.NEVER;
  });
}

/**
 * Quantity boxes (payload path → text typed) whose text read as no quantity say why in the person's
 * terms ("8 ft 3.5 in"), ahead of NOT_A_NUMBER: a `check` for payloadSchema.
 */
export function quantityIssues(qi: QuantityInput, payload: unknown, boxes: Record<string, string | undefined>, quantity: Quantity = "length"): FormIssue[] {
  return Object.entries(boxes).flatMap(([path, text]) => {
    const problem = Number.isNaN(valueAt(payload, path.split("."))) ? qi.problem(text, quantity) : null;
    return problem ? [{ path, message: problem }] : [];
  });
}

const LEAF_KEYS = new Set(["type", "message", "ref", "types"]);

/**
 * react-hook-form's nested errors as one map by dotted path ("geometry.diameter_m", "channels.1.max_range_m"),
 * the form's own (root) error under "_", for errorReader and FormAlert.
 */
export function flatErrors<T extends FieldValues>(errors: HookFormErrors<T>): FieldErrors {
  const out: FieldErrors = {};
  const walk = (node: unknown, path: string) => {
    if (!node || typeof node !== "object") return;
    const message = (node as { message?: unknown }).message;
    if (typeof message === "string" && message) out[path || "_"] ??= message;
    for (const [key, child] of Object.entries(node)) {
      if (LEAF_KEYS.has(key)) continue;
      // An array's own error sits under "root"; the form's under the top-level "root".
      walk(child, key === "root" ? path : path ? `${path}.${key}` : key);
    }
  };
  walk(errors, "");
  return out;
}
