import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { findSite } from "@/lib/services/sites";
import { findOrNotFound } from "@/lib/http/not-found";
import { PageHeader } from "@/components/ui/page-header";
import { SiteEditor } from "@/components/sites/site-form";

export const metadata: Metadata = { title: "Edit site" };

export default async function EditSitePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("site:manage");
  const { id } = await params;
  const site = await findOrNotFound(id, (id) => findSite(user.scope, id));
  return (
    <>
      <PageHeader title={`Edit ${site.name}`} path={[{ href: "/sites", label: "Sites" }]} />
      <SiteEditor id={id} timeZones={Intl.supportedValuesOf("timeZone")} />
    </>
  );
}
