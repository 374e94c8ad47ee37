import Link from "next/link";
import type { SessionUser } from "@/lib/auth/session";
import { navFor } from "@/lib/navigation";
import { Wordmark } from "@/components/shell/wordmark";
import { NavLinks } from "@/components/shell/nav-links";
import { SignOutButton } from "@/components/shell/sign-out-button";
import { TimeViewToggle } from "@/components/ui/site-time";
import { DisplaySettingsProvider } from "@/components/ui/display-settings";
import type { DisplaySettings } from "@/lib/format/display";

export function AppShell({ user, display, children }: { user: SessionUser; display: DisplaySettings; children: React.ReactNode }) {
  return (
    <DisplaySettingsProvider settings={display}>
      <div className="min-h-screen">
        <header className="border-b border-rule bg-card">
          <div className="mx-auto flex max-w-screen-2xl items-center gap-6 px-4 py-2">
            <Link href="/" aria-label="Halftrip home" className="shrink-0">
              <Wordmark />
            </Link>
            <div className="ml-auto flex items-center gap-3 text-sm">
              <span className="hidden text-muted sm:inline" data-testid="signed-in-as">
                {user.email} · <span className="capitalize">{user.role}</span>
              </span>
              <TimeViewToggle />
              <SignOutButton />
            </div>
          </div>
        </header>
        <div className="mx-auto flex max-w-screen-2xl flex-col gap-6 px-4 py-4 md:flex-row md:py-6">
          <NavLinks sections={navFor(user.role)} />
          <main className="min-w-0 flex-1">{children}</main>
        </div>
      </div>
    </DisplaySettingsProvider>
  );
}
