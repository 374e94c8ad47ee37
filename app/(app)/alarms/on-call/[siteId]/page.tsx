import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { findSite } from "@/lib/services/sites";
import { findOrNotFound } from "@/lib/http/not-found";
import { PageHeader } from "@/components/ui/page-header";
import { AlarmOnCallForm } from "@/components/alarms/alarm-on-call-form";

export const metadata: Metadata = { title: "On call" };

export default async function OnCallPage({ params }: { params: Promise<{ siteId: string }> }) {
  const user = await requirePageUser();
  const { siteId } = await params;
  const site = await findOrNotFound(siteId, (id) => findSite(user.scope, id));
  const editable = can(user.role, "oncall:edit");
  return (
    <>
      <PageHeader
        title={`On call · ${site.name}`}
        path={[{ href: "/alarms", label: "Alarms" }, { href: `/alarms?site_id=${site.id}`, label: site.name }]}
        facts={editable ? "Who is e-mailed about this site's alarms, in escalation order." : "Read only: operators and admins edit the on-call list."}
      />
      <AlarmOnCallForm siteId={site.id} editable={editable} />
    </>
  );
}
