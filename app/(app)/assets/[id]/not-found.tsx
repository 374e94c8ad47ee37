import { NotFoundPanel } from "@/components/site-provisioning-kit";

export default function AssetNotFound() {
  return <NotFoundPanel what="Asset" backHref="/assets" backLabel="Back to the assets" />;
}
