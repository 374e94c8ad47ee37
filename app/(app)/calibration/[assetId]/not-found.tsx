import { NotFoundPanel } from "@/components/site-provisioning-kit";

export default function CalibrationTankNotFound() {
  return <NotFoundPanel what="Tank" backHref="/calibration" backLabel="Back to calibration" />;
}
