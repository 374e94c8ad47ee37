import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { findSite } from "@/lib/db/queries/sites";
import { HttpError } from "@/lib/http/errors";
import { isUuid } from "@/lib/validations/common";
import { PageHeader } from "@/components/ui/page-header";
import { SiteLive } from "@/components/sites/site-live";

export const metadata: Metadata = { title: "Site" };

export default async function SitePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser();
  const { id } = await params;
  if (!isUuid(id)) notFound();
  const site = await findSite(user.organisationId, id).catch((e) => {
    if (e instanceof HttpError && e.status === 404) notFound();
    throw e;
  });
  return (
    <>
      <PageHeader
        title={site.name}
        path={[{ href: "/", label: "Overview" }]}
        facts="Its alarms, tanks, bays and points, live."
        actions={can(user.role, "site:manage") && <Link href={`/sites/${id}/edit`} className="btn-quiet">Edit site</Link>}
      />
      <SiteLive siteId={id} canAcknowledge={can(user.role, "alarm:acknowledge")} />
    </>
  );
}
