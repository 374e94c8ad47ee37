import type { Metadata } from "next";
import Link from "next/link";
import { Suspense } from "react";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { Loading } from "@/components/ui/data-state";
import { AlarmCaution } from "@/components/alarms/alarm-caution";
import { AlarmTable } from "@/components/alarms/alarm-table";
import { AlarmFloodBanner } from "@/components/alarms/alarm-flood-banner";
import { AlarmCauseGroups } from "@/components/alarms/alarm-cause-groups";

export const metadata: Metadata = { title: "Alarms" };

export default async function AlarmsPage() {
  const user = await requirePageUser();
  return (
    <>
      <PageHeader
        title="Alarms"
        path={[{ href: "/", label: "Overview" }]}
        facts="Level, leak and sensor alarms of every site, most urgent first."
        actions={<Link href="/alarm-health" className="btn-quiet">Alarm health</Link>}
      />
      <AlarmCaution />
      <AlarmFloodBanner organisationId={user.organisationId} />
      <AlarmCauseGroups />
      <Suspense fallback={<Loading />}>
        <AlarmTable role={user.role} />
      </Suspense>
    </>
  );
}
