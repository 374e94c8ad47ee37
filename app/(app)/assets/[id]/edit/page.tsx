import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { requirePageUser } from "@/lib/auth/session";
import { findAsset } from "@/lib/db/queries/assets";
import { HttpError } from "@/lib/http/errors";
import { isUuid } from "@/lib/validations/common";
import { PageHeader } from "@/components/ui/page-header";
import { AssetEditor } from "@/components/assets/asset-form";

export const metadata: Metadata = { title: "Edit asset" };

export default async function EditAssetPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("asset:manage");
  const { id } = await params;
  if (!isUuid(id)) notFound();
  const asset = await findAsset(user.organisationId, id).catch((e) => {
    if (e instanceof HttpError && e.status === 404) notFound();
    throw e;
  });
  return (
    <>
      <PageHeader title={`Edit ${asset.name}`} path={[{ href: "/assets", label: "Assets" }]} facts={asset.kind} />
      <AssetEditor id={id} />
    </>
  );
}
