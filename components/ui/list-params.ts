"use client";

import { usePathname, useRouter, useSearchParams } from "next/navigation";
import type { z } from "zod";

// A list's filters, sort and page live in the URL. Each value is checked by the field of the same zod
// schema the route handler uses, one field at a time, so a bad value drops only itself.

type QuerySchema = { shape: Record<string, z.ZodType> };

export function useListParams<K extends string>(schema: QuerySchema, keys: readonly K[], filterKeys: readonly K[]) {
  const router = useRouter();
  const pathname = usePathname();
  const params = useSearchParams();
  const values = {} as Partial<Record<K, string>>;
  for (const key of keys) {
    const raw = params.get(key);
    if (raw && schema.shape[key]?.safeParse(raw).success) values[key] = raw;
  }

  function replace(next: URLSearchParams) {
    const qs = next.toString();
    router.replace(qs ? `${pathname}?${qs}` : pathname, { scroll: false });
  }

  /** Sets (or, with "" / null, removes) values; any change but a page change goes back to page 1. */
  function set(changes: Partial<Record<K | "page", string | null>>) {
    const next = new URLSearchParams(params.toString());
    for (const [key, value] of Object.entries(changes) as [string, string | null][]) {
      if (value) next.set(key, value);
      else next.delete(key);
    }
    if (!("page" in changes)) next.delete("page");
    replace(next);
  }

  /** Removes every filter; sort and page size stay. */
  function clearFilters() {
    const next = new URLSearchParams(params.toString());
    for (const key of [...filterKeys, "page"]) next.delete(key);
    replace(next);
  }

  const filtered = filterKeys.some((key) => params.get(key));
  return { values, raw: (key: string) => params.get(key), set, clearFilters, filtered };
}
