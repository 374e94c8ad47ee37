import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { findAsset } from "@/lib/services/assets";
import { findOrNotFound } from "@/lib/http/not-found";
import { PageHeader } from "@/components/ui/page-header";
import { AlarmCaution } from "@/components/alarms/alarm-caution";
import { AlarmSetpointForm } from "@/components/alarms/alarm-setpoint-form";

export const metadata: Metadata = { title: "Alarm setpoints" };

export default async function SetpointsPage({ params }: { params: Promise<{ assetId: string }> }) {
  const user = await requirePageUser();
  const { assetId } = await params;
  const asset = await findOrNotFound(assetId, (id) => findAsset(user.scope, id));
  if (asset.kind !== "tank") notFound();
  const editable = can(user.role, "setpoint:edit");
  return (
    <>
      <PageHeader
        title={`Setpoints · ${asset.name}`}
        path={[{ href: "/alarms", label: "Alarms" }, { href: `/assets/${asset.id}`, label: asset.name }]}
        facts={editable ? "HH, H, L and LL level alarms with deadband and on-delay, and a leak alarm." : "Read only: operators and admins edit setpoints."}
      />
      <AlarmCaution />
      <AlarmSetpointForm assetId={asset.id} editable={editable} />
    </>
  );
}
