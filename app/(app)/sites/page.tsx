import type { Metadata } from "next";
import Link from "next/link";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { PageHeader } from "@/components/ui/page-header";
import { SiteTable } from "@/components/sites/site-table";

export const metadata: Metadata = { title: "Sites" };

export default async function SitesPage() {
  const user = await requirePageUser();
  return (
    <>
      <PageHeader
        title="Sites"
        path={[{ href: "/", label: "Overview" }]}
        facts="Each place with its time zone and the air temperature used when no better one is known."
        actions={can(user.role, "site:manage") && <Link href="/sites/new" className="btn">Add a site</Link>}
      />
      <SiteTable role={user.role} />
    </>
  );
}
