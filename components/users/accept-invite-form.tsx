"use client";

import Link from "next/link";
import { useState } from "react";
import { fetchJson } from "@/lib/fetcher";
import { acceptInviteSchema } from "@/lib/validations/user";

export function AcceptInviteForm({ token }: { token: string }) {
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [done, setDone] = useState(false);
  const [busy, setBusy] = useState(false);

  async function onSubmit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const parsed = acceptInviteSchema.safeParse({ token, password: form.get("password"), confirm: form.get("confirm") });
    if (!parsed.success) {
      const f: Record<string, string> = {};
      for (const i of parsed.error.issues) f[String(i.path[0])] ??= i.message;
      return setErrors(f);
    }
    setErrors({});
    setBusy(true);
    try {
      await fetchJson("/api/invites/accept", { method: "POST", body: JSON.stringify(parsed.data) });
      setDone(true);
    } catch (e) {
      setErrors({ _: (e as Error).message });
    } finally {
      setBusy(false);
    }
  }

  if (done) {
    return (
      <p role="status">
        Your password is set. <Link href="/sign-in" className="font-bold underline">Sign in</Link>
      </p>
    );
  }
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4">
      {errors._ && <p role="alert" className="field-error">{errors._}</p>}
      <div>
        <label htmlFor="password" className="label">New password</label>
        <input id="password" name="password" type="password" autoComplete="new-password" className="field" />
        {errors.password && <p className="field-error">{errors.password}</p>}
      </div>
      <div>
        <label htmlFor="confirm" className="label">Repeat it</label>
        <input id="confirm" name="confirm" type="password" autoComplete="new-password" className="field" />
        {errors.confirm && <p className="field-error">{errors.confirm}</p>}
      </div>
      <button type="submit" className="btn w-full" disabled={busy}>{busy ? "Saving…" : "Set password"}</button>
    </form>
  );
}
