import type { Metadata } from "next";
import Link from "next/link";
import { lookUpInvite } from "@/lib/services/users";
import { inviteProblem } from "@/lib/auth/invite-messages";
import { Wordmark } from "@/components/shell/wordmark";
import { AcceptInviteForm } from "@/components/users/accept-invite-form";

export const metadata: Metadata = { title: "Set your password" };
export const dynamic = "force-dynamic";

export default async function InvitePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const invite = await lookUpInvite(decodeURIComponent(token));
  return (
    <main className="flex min-h-screen items-center justify-center px-4">
      <div className="w-full max-w-sm">
        <Wordmark className="mb-8" />
        {invite.ok ? (
          <>
            <h1 className="mb-1 text-2xl font-bold">Set your password</h1>
            <p className="mb-6 text-sm text-muted">For {invite.email}. This link works once.</p>
            <AcceptInviteForm token={decodeURIComponent(token)} />
          </>
        ) : (
          <>
            <h1 className="mb-2 text-2xl font-bold">This link cannot be used</h1>
            <p role="alert" className="mb-6">{inviteProblem(invite.reason)}</p>
            <Link href="/sign-in" className="btn-quiet">Go to sign-in</Link>
          </>
        )}
      </div>
    </main>
  );
}
