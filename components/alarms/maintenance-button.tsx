"use client";

import { useState } from "react";
import { fetchJson } from "@/lib/fetcher";
import { MAX_SHELVE_HOURS } from "@/lib/alarms/engine";
import { MAX_OUT_OF_SERVICE_DAYS, MIN_REASON_LENGTH } from "@/lib/alarms/maintenance";

const HOURS = [1, 2, 4, 8, MAX_SHELVE_HOURS, 72, 168, MAX_OUT_OF_SERVICE_DAYS * 24];

/**
 * Shelve, or take out of service, every alarm of a device or a site for maintenance, with a reason and
 * an expiry (POST /api/{devices|sites}/{id}/maintenance). Out of service is for administrators.
 */
export function MaintenanceButton({ scope, id, mayTakeOutOfService }: { scope: "device" | "site"; id: string; mayTakeOutOfService: boolean }) {
  const [open, setOpen] = useState(false);
  const [mode, setMode] = useState<"shelve" | "out_of_service">("shelve");
  const [hours, setHours] = useState(2);
  const [reason, setReason] = useState("");
  const [message, setMessage] = useState<string | null>(null);
  const allowed = HOURS.filter((h) => (mode === "shelve" ? h <= MAX_SHELVE_HOURS : true));

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setMessage(null);
    try {
      const until = new Date(Date.now() + hours * 3_600_000).toISOString();
      const r = await fetchJson<{ alarms_changed: number; until: string }>(`/api/${scope}s/${id}/maintenance`, { method: "POST", body: JSON.stringify({ mode, reason, until }) });
      setMessage(`${r.alarms_changed} alarm${r.alarms_changed === 1 ? "" : "s"} ${mode === "shelve" ? "shelved" : "out of service"} until ${new Date(r.until).toLocaleString()}.`);
      setOpen(false);
    } catch (err) {
      setMessage(err instanceof Error ? err.message : "Could not start the maintenance window.");
    }
  }

  return (
    <div className="space-y-2">
      <button type="button" className="btn-quiet" onClick={() => setOpen((o) => !o)} aria-expanded={open}>
        Maintenance…
      </button>
      {open && (
        <form onSubmit={submit} className="space-y-2 rounded border border-slate-200 p-3 text-sm" aria-label={`Maintenance of this ${scope}`}>
          <label className="label" htmlFor={`mw-mode-${id}`}>What</label>
          <select id={`mw-mode-${id}`} className="field" value={mode} onChange={(e) => setMode(e.target.value as typeof mode)}>
            <option value="shelve">Shelve every alarm of this {scope} (at most {MAX_SHELVE_HOURS} h)</option>
            {mayTakeOutOfService && <option value="out_of_service">Take every alarm out of service (at most {MAX_OUT_OF_SERVICE_DAYS} days)</option>}
          </select>
          <label className="label" htmlFor={`mw-hours-${id}`}>For</label>
          <select id={`mw-hours-${id}`} className="field" value={hours} onChange={(e) => setHours(Number(e.target.value))}>
            {allowed.map((h) => <option key={h} value={h}>{h < 48 ? `${h} h` : `${h / 24} days`}</option>)}
          </select>
          <label className="label" htmlFor={`mw-reason-${id}`}>Reason (at least {MIN_REASON_LENGTH} characters)</label>
          <textarea id={`mw-reason-${id}`} className="field w-full" value={reason} onChange={(e) => setReason(e.target.value)} required minLength={MIN_REASON_LENGTH} />
          <p className="text-slate-600">The alarms are still evaluated and logged, and return by themselves at the end.</p>
          <button type="submit" className="btn">Start</button>
        </form>
      )}
      {message && <p role="status">{message}</p>}
    </div>
  );
}
