import type { Metadata } from "next";
import Link from "next/link";
import { Suspense } from "react";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { PageHeader } from "@/components/ui/page-header";
import { Loading } from "@/components/ui/data-state";
import { AssetTable } from "@/components/assets/asset-table";

export const metadata: Metadata = { title: "Assets" };

export default async function AssetsPage() {
  const user = await requirePageUser();
  return (
    <>
      <PageHeader
        title="Assets"
        path={[{ href: "/", label: "Overview" }]}
        facts="Tanks, parking bays and distance points at each site."
        actions={can(user.role, "asset:manage") && <Link href="/assets/new" className="btn">Add an asset</Link>}
      />
      <Suspense fallback={<Loading />}>
        <AssetTable role={user.role} />
      </Suspense>
    </>
  );
}
