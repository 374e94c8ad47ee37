import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { isUuid } from "@/lib/validations/common";
import { PageHeader } from "@/components/ui/page-header";
import { AssetForm } from "@/components/assets/asset-form";

export const metadata: Metadata = { title: "Add an asset" };

export default async function NewAssetPage({ searchParams }: { searchParams: Promise<{ site_id?: string }> }) {
  await requirePageUser("asset:manage");
  const { site_id } = await searchParams;
  return (
    <>
      <PageHeader title="Add an asset" path={[{ href: "/assets", label: "Assets" }]} />
      <AssetForm siteId={site_id && isUuid(site_id) ? site_id : ""} />
    </>
  );
}
