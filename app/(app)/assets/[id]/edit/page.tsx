import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { findAsset } from "@/lib/services/assets";
import { findOrNotFound } from "@/lib/http/not-found";
import { PageHeader } from "@/components/ui/page-header";
import { AssetEditor } from "@/components/assets/asset-form";

export const metadata: Metadata = { title: "Edit asset" };

export default async function EditAssetPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("asset:manage");
  const { id } = await params;
  const asset = await findOrNotFound(id, (id) => findAsset(user.scope, id));
  return (
    <>
      <PageHeader title={`Edit ${asset.name}`} path={[{ href: "/assets", label: "Assets" }]} facts={asset.kind} />
      <AssetEditor id={id} />
    </>
  );
}
