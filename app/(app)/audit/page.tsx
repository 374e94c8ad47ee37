import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { AuditLogTable } from "@/components/audit/audit-log-table";

export const metadata: Metadata = { title: "Audit log" };

export default async function AuditPage() {
  await requirePageUser("audit:read");
  return (
    <>
      <PageHeader title="Audit log" facts="Who changed what, newest first." />
      <AuditLogTable />
    </>
  );
}
