import type { Metadata } from "next";
import { Suspense } from "react";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { Loading } from "@/components/ui/data-state";
import { CalibrationTankList } from "@/components/calibration/calibration-tank-list";

export const metadata: Metadata = { title: "Calibration" };

export default async function CalibrationPage() {
  await requirePageUser("dip:record");
  return (
    <>
      <PageHeader title="Calibration" path={[{ href: "/", label: "Overview" }]} facts="Record manual dips and calibrate a tank's sensor from them." />
      <Suspense fallback={<Loading />}>
        <CalibrationTankList />
      </Suspense>
    </>
  );
}
