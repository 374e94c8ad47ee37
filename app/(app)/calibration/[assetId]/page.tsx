import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { findAsset } from "@/lib/services/assets";
import { findSite } from "@/lib/services/sites";
import { findOrNotFound } from "@/lib/http/not-found";
import { PageHeader } from "@/components/ui/page-header";
import { CalibrationWorkbench } from "@/components/calibration/calibration-workbench";

export const metadata: Metadata = { title: "Dips and calibration" };

export default async function TankCalibrationPage({ params }: { params: Promise<{ assetId: string }> }) {
  const user = await requirePageUser("dip:record");
  const { assetId } = await params;
  const asset = await findOrNotFound(assetId, (id) => findAsset(user.scope, id));
  if (asset.kind !== "tank") notFound();
  const site = await findSite(user.scope, asset.site_id);
  return (
    <>
      <PageHeader
        title={`${asset.name}: dips and calibration`}
        path={[
          { href: "/calibration", label: "Calibration" },
          { href: `/sites/${site.id}`, label: site.name },
        ]}
        facts={asset.mount_height_m != null ? `Sensor face ${asset.mount_height_m.toFixed(3)} m above the tank bottom.` : "No sensor mounting height set."}
      />
      <CalibrationWorkbench assetId={asset.id} canRecord={can(user.role, "dip:record")} canApply={can(user.role, "calibration:apply")} />
    </>
  );
}
