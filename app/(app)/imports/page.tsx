import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { ImportHistory } from "@/components/imports/import-history";
import { ImportUploader } from "@/components/imports/import-uploader";

export const metadata: Metadata = { title: "Imports" };

export default async function ImportsPage() {
  await requirePageUser("import:manage");
  return (
    <>
      <PageHeader
        title="Imports"
        path={[{ href: "/", label: "Overview" }]}
        facts="CSV files of backfill readings, strapping tables, manual dips and temperature series; a file with errors imports nothing unless you ask for the good rows."
      />
      <div className="space-y-8">
        <ImportUploader />
        <ImportHistory />
      </div>
    </>
  );
}
