import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { findSite } from "@/lib/db/queries/sites";
import { HttpError } from "@/lib/http/errors";
import { isUuid } from "@/lib/validations/common";
import { PageHeader } from "@/components/ui/page-header";
import { AlarmOnCallForm } from "@/components/alarms/alarm-on-call-form";

export const metadata: Metadata = { title: "On call" };

export default async function OnCallPage({ params }: { params: Promise<{ siteId: string }> }) {
  const user = await requirePageUser();
  const { siteId } = await params;
  if (!isUuid(siteId)) notFound();
  const site = await findSite(user.organisationId, siteId).catch((e) => {
    if (e instanceof HttpError && e.status === 404) notFound();
    throw e;
  });
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
