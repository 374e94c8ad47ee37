import type { Metadata } from "next";
import { Suspense } from "react";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { Loading } from "@/components/ui/data-state";
import { AlarmCaution } from "@/components/alarms/alarm-caution";
import { AlarmHealthReport } from "@/components/alarms/alarm-health-report";

export const metadata: Metadata = { title: "Alarm health" };

export default async function AlarmHealthPage() {
  await requirePageUser();
  return (
    <>
      <PageHeader
        title="Alarm health"
        path={[{ href: "/alarms", label: "Alarms" }]}
        facts="How many alarms, how bunched, how long they stay — each beside the ISA-18.2 / EEMUA 191 benchmark. The last 30 days unless you choose."
      />
      <AlarmCaution />
      <Suspense fallback={<Loading />}>
        <AlarmHealthReport />
      </Suspense>
    </>
  );
}
