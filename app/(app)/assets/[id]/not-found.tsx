import { NotFoundPanel } from "@/components/ui/form-fields";

export default function AssetNotFound() {
  return <NotFoundPanel what="Asset" backHref="/assets" backLabel="Back to the assets" />;
}
