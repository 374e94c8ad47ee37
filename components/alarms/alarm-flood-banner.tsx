import Link from "next/link";
import { alarmFloodStatus } from "@/lib/read-models/alarm-floods";

/** Server component: a banner while the organisation (or one site) is in an alarm flood, nothing otherwise. */
export async function AlarmFloodBanner({ organisationId, siteId = null }: { organisationId: string; siteId?: string | null }) {
  const flood = await alarmFloodStatus(organisationId, siteId);
  if (!flood.active) return null;
  return (
    <div role="alert" className="rounded border border-red-300 bg-red-50 px-4 py-3 text-sm text-red-900">
      <p className="font-semibold">Alarm flood: {flood.lastTenMinutes} alarms in the last 10 minutes (peak {flood.peakPer10Min}).</p>
      <p>
        A flood is more than 10 alarms in 10 minutes (ISA-18.2). Work the list by cause: one fault often raises many alarms.{" "}
        <Link href={`/alarms?include=suppressed${siteId ? `&site_id=${siteId}` : ""}`} className="underline">See alarms by cause</Link>
      </p>
    </div>
  );
}
