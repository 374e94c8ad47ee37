import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { requirePageUser } from "@/lib/auth/session";
import { findSite } from "@/lib/db/queries/sites";
import { HttpError } from "@/lib/http/errors";
import { isUuid } from "@/lib/validations/common";
import { PageHeader } from "@/components/ui/page-header";
import { SiteEditor } from "@/components/sites/site-form";

export const metadata: Metadata = { title: "Edit site" };

export default async function EditSitePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("site:manage");
  const { id } = await params;
  if (!isUuid(id)) notFound();
  const site = await findSite(user.organisationId, id).catch((e) => {
    if (e instanceof HttpError && e.status === 404) notFound();
    throw e;
  });
  return (
    <>
      <PageHeader title={`Edit ${site.name}`} path={[{ href: "/sites", label: "Sites" }]} />
      <SiteEditor id={id} timeZones={Intl.supportedValuesOf("timeZone")} />
    </>
  );
}
