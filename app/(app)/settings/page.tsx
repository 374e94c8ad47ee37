import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { can } from "@/lib/auth/permissions";
import { displaySettingsOf } from "@/lib/services/display-settings";
import { PageHeader } from "@/components/ui/page-header";
import { DisplaySettingsForms } from "@/components/settings/display-settings-form";

export const metadata: Metadata = { title: "Units and clock" };

export default async function DisplaySettingsPage() {
  const user = await requirePageUser();
  const view = await displaySettingsOf(user.organisationId, user.id);
  return (
    <>
      <PageHeader title="Units and clock" facts="SI or US customary units, the decimal separator and the clock you read." />
      <DisplaySettingsForms view={view} canManageOrganisation={can(user.role, "organisation:manage")} />
    </>
  );
}
