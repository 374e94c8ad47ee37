"use client";

import useSWR from "swr";
import { swrFetcher } from "@/lib/fetcher";
import type { SiteJson } from "@/lib/services/sites";

/** The sites the viewer may see; SWR shares the one request among every user of the key on a page. */
export function useSites() {
  return useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
}

/** A list's "Site" choice, "All sites" first; the value is a site id, or "" for all. */
export function SiteFilter({ id, value, onChange, className = "field w-auto" }: { id: string; value: string; onChange: (siteId: string) => void; className?: string }) {
  const sites = useSites();
  return (
    <div>
      <label htmlFor={id} className="label">Site</label>
      <select id={id} className={className} value={value} onChange={(e) => onChange(e.target.value)}>
        <option value="">All sites</option>
        {sites.data?.items.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
      </select>
    </div>
  );
}
