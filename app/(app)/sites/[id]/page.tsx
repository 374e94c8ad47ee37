import type { Metadata } from "next";
import Link from "next/link";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { findSite } from "@/lib/services/sites";
import { findOrNotFound } from "@/lib/http/not-found";
import { PageHeader } from "@/components/ui/page-header";
import { SiteLive } from "@/components/sites/site-live";
import { AlarmFloodBanner } from "@/components/alarms/alarm-flood-banner";
import { AlarmCauseGroups } from "@/components/alarms/alarm-cause-groups";
import { MaintenanceButton } from "@/components/alarms/maintenance-button";

export const metadata: Metadata = { title: "Site" };

export default async function SitePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser();
  const { id } = await params;
  const site = await findOrNotFound(id, (id) => findSite(user.scope, id));
  return (
    <>
      <PageHeader
        title={site.name}
        path={[{ href: "/", label: "Overview" }]}
        facts="Its alarms, tanks, bays and points, live."
        actions={can(user.role, "site:manage") && <Link href={`/sites/${id}/edit`} className="btn-quiet">Edit site</Link>}
      />
      <AlarmFloodBanner organisationId={user.organisationId} siteId={id} />
      {can(user.role, "alarm:shelve") && <MaintenanceButton scope="site" id={id} mayTakeOutOfService={can(user.role, "alarm:out_of_service")} />}
      <AlarmCauseGroups siteId={id} />
      <SiteLive siteId={id} canAcknowledge={can(user.role, "alarm:acknowledge")} />
    </>
  );
}
