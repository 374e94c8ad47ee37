import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { ExportForms } from "@/components/exports/export-forms";

export const metadata: Metadata = { title: "Exports" };

export default async function ExportsPage() {
  await requirePageUser("export:read");
  return (
    <>
      <PageHeader
        title="Exports"
        path={[{ href: "/", label: "Overview" }]}
        facts="CSV files of measurements, alarm events and the refill plan, streamed as they are read."
      />
      <ExportForms />
    </>
  );
}
