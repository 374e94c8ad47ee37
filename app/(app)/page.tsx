import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { fetchOrganisationName } from "@/lib/services/organisations";
import { PageHeader } from "@/components/ui/page-header";
import { FleetOverview } from "@/components/fleet/fleet-overview";

export const metadata: Metadata = { title: "Overview" };

export default async function OverviewPage() {
  const user = await requirePageUser();
  const organisation = await fetchOrganisationName(user.organisationId);
  return (
    <>
      <PageHeader title="Overview" facts={<>{organisation} · every site, live</>} />
      <FleetOverview />
    </>
  );
}
