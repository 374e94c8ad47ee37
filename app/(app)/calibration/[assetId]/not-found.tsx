import { NotFoundPanel } from "@/components/ui/form-fields";

export default function CalibrationTankNotFound() {
  return <NotFoundPanel what="Tank" backHref="/calibration" backLabel="Back to calibration" />;
}
