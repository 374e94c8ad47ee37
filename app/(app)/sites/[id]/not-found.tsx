import { NotFoundPanel } from "@/components/site-provisioning-kit";

export default function SiteNotFound() {
  return <NotFoundPanel what="Site" backHref="/sites" backLabel="Back to the sites" />;
}
