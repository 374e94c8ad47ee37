"use client";

import useSWR from "swr";
import Link from "next/link";
import { swrFetcher } from "@/lib/fetcher";
import type { AlarmGroup } from "@/lib/alarms/floods";
import { PriorityBadge } from "@/components/ui/priority-badge";

type LabelledGroup = AlarmGroup & { label: string };

/**
 * The alarms that are not normal, grouped by cause (a silent device with the alarms it suppresses, a
 * faulty channel, a common cause), falling back to device and site, each with its counts.
 */
export function AlarmCauseGroups({ siteId }: { siteId?: string }) {
  const q = new URLSearchParams({ state: "active", include: "suppressed", group: "cause", page_size: "1" });
  if (siteId) q.set("site_id", siteId);
  const { data } = useSWR<{ groups: LabelledGroup[] }>(`/api/alarms?${q}`, swrFetcher, { refreshInterval: 15_000 });
  const groups = data?.groups ?? [];
  if (groups.length === 0) return null;
  return (
    <section aria-label="Alarms by cause" className="space-y-2">
      <h2 className="text-sm font-semibold">By cause</h2>
      <ul className="grid gap-2 sm:grid-cols-2 lg:grid-cols-3">
        {groups.map((g) => (
          <li key={g.key} className="rounded border border-slate-200 px-3 py-2 text-sm">
            <div className="flex items-center gap-2">
              <PriorityBadge priority={g.highestPriority} calm={g.counts.needsAttention === 0} />
              <span className="font-medium">{g.label}</span>
            </div>
            <p className="text-slate-600">
              {g.counts.total} alarm{g.counts.total === 1 ? "" : "s"}: {g.counts.needsAttention} need attention, {g.counts.active} active, {g.counts.hidden} shelved, suppressed or out of service
            </p>
            {g.by === "device" && <Link href={`/devices/${g.id}`} className="underline">Device</Link>}
          </li>
        ))}
      </ul>
    </section>
  );
}
