import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/page-header";
import { fetchOrganisationName } from "@/lib/db/queries/organisations";

export const metadata: Metadata = { title: "Overview" };

export default async function OverviewPage() {
  const user = await requirePageUser();
  const organisation = await fetchOrganisationName(user.organisationId);
  return (
    <>
      <PageHeader title="Overview" facts={organisation} />
      <section className="card p-6">
        <p>Signed in as {user.name || user.email} ({user.role}).</p>
      </section>
    </>
  );
}
