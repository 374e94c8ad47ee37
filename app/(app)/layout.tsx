import { requirePageUser } from "@/lib/auth/session";
import { AppShell } from "@/components/shell/app-shell";
import { requestDisplaySettings } from "@/lib/services/display-settings";

export const dynamic = "force-dynamic";

export default async function SignedInLayout({ children }: { children: React.ReactNode }) {
  const user = await requirePageUser();
  return (
    <AppShell user={user} display={await requestDisplaySettings(user)}>
      {children}
    </AppShell>
  );
}
