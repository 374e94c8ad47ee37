"use client";

import useSWR from "swr";
import { useState } from "react";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import type { SiteJson } from "@/lib/services/sites";
import type { UserRow } from "@/lib/services/users";
import { Loading, LoadError } from "@/components/ui/data-state";

/**
 * Partner scope on the users page: each viewer reads every site, or only the sites ticked here
 * (a delivery partner or a customer sees its own tanks and no one else's). docs/security.md.
 */
export function ViewerSitesEditor({ users, onSaved }: { users: UserRow[]; onSaved: () => void }) {
  const { data, error, isLoading, mutate } = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  const viewers = users.filter((u) => u.role === "viewer" && u.status !== "deactivated");
  return (
    <section className="card p-3" aria-labelledby="viewer-sites-heading">
      <h2 id="viewer-sites-heading" className="text-lg font-bold">What viewers see</h2>
      <p className="mb-3 text-sm text-muted">A viewer limited to sites reads only their dashboards, alarms, refill plan and exports, and no one&apos;s e-mail address.</p>
      {isLoading && <Loading />}
      {error && <LoadError error={error} retry={() => mutate()} />}
      {data && !viewers.length && <p className="text-sm text-muted">No viewers yet: invite one with the viewer role.</p>}
      {data && viewers.map((v) => <ViewerSites key={v.id} viewer={v} sites={data.items} onSaved={onSaved} />)}
    </section>
  );
}

function ViewerSites({ viewer, sites, onSaved }: { viewer: UserRow; sites: SiteJson[]; onSaved: () => void }) {
  const [limited, setLimited] = useState(viewer.site_ids !== null);
  const [chosen, setChosen] = useState<string[]>(viewer.site_ids ?? []);
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const group = `sites-${viewer.id}`;

  async function save() {
    setBusy(true);
    setMessage(null);
    try {
      await fetchJson(`/api/users/${viewer.id}`, { method: "PATCH", body: JSON.stringify({ site_ids: limited ? chosen : null }) });
      setMessage({ ok: true, text: limited ? `Limited to ${chosen.length} site${chosen.length === 1 ? "" : "s"}.` : "Sees every site." });
      onSaved();
    } catch (e) {
      setMessage({ ok: false, text: (e as Error).message });
    } finally {
      setBusy(false);
    }
  }

  return (
    <fieldset className="mb-3 border-t border-rule pt-3">
      <legend className="font-bold">{viewer.name || viewer.email} <span className="font-normal text-muted">{viewer.email}</span></legend>
      <div className="flex flex-wrap gap-4 text-sm">
        <label className="flex items-center gap-2">
          <input type="radio" name={group} checked={!limited} onChange={() => setLimited(false)} /> Every site
        </label>
        <label className="flex items-center gap-2">
          <input type="radio" name={group} checked={limited} onChange={() => setLimited(true)} /> Only these sites
        </label>
      </div>
      {limited && (
        <ul className="mt-2 grid gap-1 text-sm sm:grid-cols-2">
          {sites.map((s) => (
            <li key={s.id}>
              <label className="flex items-center gap-2">
                <input
                  type="checkbox"
                  checked={chosen.includes(s.id)}
                  onChange={(e) => setChosen((list) => (e.target.checked ? [...list, s.id] : list.filter((id) => id !== s.id)))}
                />
                {s.name}
              </label>
            </li>
          ))}
        </ul>
      )}
      {limited && !chosen.length && <p className="mt-1 text-sm">▲ No site ticked: this viewer sees no site at all.</p>}
      <div className="mt-2 flex items-center gap-3">
        <button type="button" className="btn-quiet h-8" disabled={busy} onClick={save} aria-label={`Save sites of ${viewer.name || viewer.email}`}>
          Save sites
        </button>
        {message && <p role={message.ok ? "status" : "alert"} className="text-sm">{message.ok ? "" : "◆ "}{message.text}</p>}
      </div>
    </fieldset>
  );
}
