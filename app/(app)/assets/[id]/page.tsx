import type { Metadata } from "next";
import Link from "next/link";
import { Suspense } from "react";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { findAsset } from "@/lib/services/assets";
import { findSite } from "@/lib/services/sites";
import { findOrNotFound } from "@/lib/http/not-found";
import { PageHeader } from "@/components/ui/page-header";
import { Loading } from "@/components/ui/data-state";
import { AssetLive } from "@/components/assets/asset-live";
import { UncertaintyBudgetTable } from "@/components/assets/uncertainty-budget-table";

export const metadata: Metadata = { title: "Asset" };

const KIND_WORDS = { tank: "Tank", bay: "Parking bay", point: "Distance point" } as const;

export default async function AssetPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser();
  const { id } = await params;
  const asset = await findOrNotFound(id, (id) => findAsset(user.scope, id));
  const site = await findSite(user.scope, asset.site_id);
  return (
    <>
      <PageHeader
        title={asset.name}
        path={[{ href: "/", label: "Overview" }, { href: `/sites/${site.id}`, label: site.name }]}
        facts={<>{KIND_WORDS[asset.kind]} at {site.name}{asset.kind === "bay" && asset.bay_level ? ` · ${asset.bay_level}` : ""}</>}
        actions={
          <>
            {asset.kind === "tank" && can(user.role, "dip:record") && <Link href={`/calibration/${id}#dip-form-title`} className="btn">Record a dip</Link>}
            {can(user.role, "asset:manage") && <Link href={`/assets/${id}/edit`} className="btn-quiet">Edit asset</Link>}
          </>
        }
      />
      <Suspense fallback={<Loading />}>
        <AssetLive assetId={id} canAcknowledge={can(user.role, "alarm:acknowledge")} />
      </Suspense>
      <details className="card mt-6 p-4">
        <summary className="cursor-pointer font-bold">Uncertainty budget of the latest distance</summary>
        <div className="mt-3">
          <UncertaintyBudgetTable assetId={id} zone={site.time_zone} />
        </div>
      </details>
    </>
  );
}
