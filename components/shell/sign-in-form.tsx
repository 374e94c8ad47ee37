"use client";

import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { signInSchema } from "@/lib/validations/user";
import { sameOriginPath } from "@/lib/auth/redirects";

const MESSAGES: Record<string, string> = {
  CredentialsSignin: "That e-mail and password do not match an active account.",
  too_many_attempts: "Too many failed sign-ins. Wait a few minutes and try again.",
};

export function SignInForm({ callbackUrl, initialError }: { callbackUrl: string; initialError?: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(initialError ? (MESSAGES[initialError] ?? MESSAGES.CredentialsSignin) : null);
  const [fieldErrors, setFieldErrors] = useState<{ email?: string; password?: string }>({});
  const [busy, setBusy] = useState(false);

  async function onSubmit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const parsed = signInSchema.safeParse({ email: form.get("email"), password: form.get("password") });
    setError(null);
    if (!parsed.success) {
      const f: { email?: string; password?: string } = {};
      for (const issue of parsed.error.issues) f[issue.path[0] as "email" | "password"] ??= issue.message;
      setFieldErrors(f);
      return;
    }
    setFieldErrors({});
    setBusy(true);
    try {
      const res = await signIn("credentials", { ...parsed.data, redirect: false });
      if (res?.ok && !res.error) {
        // Parsed again here: the form must not trust its prop to stay on our origin.
        router.replace(sameOriginPath(callbackUrl, window.location.origin));
        router.refresh();
        return;
      }
      setError(res?.status === 429 ? MESSAGES.too_many_attempts : MESSAGES.CredentialsSignin);
    } catch {
      setError("Halftrip could not be reached. Check your connection and try again.");
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4" aria-describedby={error ? "sign-in-error" : undefined}>
      {error && (
        <p id="sign-in-error" role="alert" className="rounded border border-critical bg-card px-3 py-2 text-sm text-critical">
          {error}
        </p>
      )}
      <div>
        <label htmlFor="email" className="label">E-mail</label>
        <input id="email" name="email" type="email" autoComplete="username" className="field" aria-invalid={!!fieldErrors.email} />
        {fieldErrors.email && <p className="field-error">{fieldErrors.email}</p>}
      </div>
      <div>
        <label htmlFor="password" className="label">Password</label>
        <input id="password" name="password" type="password" autoComplete="current-password" className="field" aria-invalid={!!fieldErrors.password} />
        {fieldErrors.password && <p className="field-error">{fieldErrors.password}</p>}
      </div>
      <button type="submit" className="btn w-full" disabled={busy}>
        {busy ? "Signing in…" : "Sign in"}
      </button>
    </form>
  );
}
