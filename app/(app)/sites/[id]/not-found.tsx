import { NotFoundPanel } from "@/components/ui/form-fields";

export default function SiteNotFound() {
  return <NotFoundPanel what="Site" backHref="/sites" backLabel="Back to the sites" />;
}
