import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { currentUser } from "@/lib/auth/session";
import { sameOriginPath } from "@/lib/auth/redirects";
import { Wordmark } from "@/components/shell/wordmark";
import { SignInForm } from "@/components/shell/sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ callbackUrl?: string; error?: string }> }) {
  if (await currentUser()) redirect("/");
  const { callbackUrl, error } = await searchParams;
  return (
    <main className="flex min-h-screen items-center justify-center px-4">
      <div className="w-full max-w-sm">
        <Wordmark className="mb-8" />
        <h1 className="mb-1 text-2xl font-bold">Sign in</h1>
        <p className="mb-6 text-sm text-muted">Levels, alarms and sensor health for your sites.</p>
        <SignInForm callbackUrl={sameOriginPath(callbackUrl)} initialError={error} />
      </div>
    </main>
  );
}
