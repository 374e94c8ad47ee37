import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { SiteForm } from "@/components/sites/site-form";

export const metadata: Metadata = { title: "Add a site" };

export default async function NewSitePage() {
  await requirePageUser("site:manage");
  return (
    <>
      <PageHeader title="Add a site" path={[{ href: "/sites", label: "Sites" }]} />
      <SiteForm timeZones={Intl.supportedValuesOf("timeZone")} />
    </>
  );
}
