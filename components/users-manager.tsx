"use client";

import useSWR from "swr";
import { useState } from "react";
import { ROLES, type Role } from "@/lib/auth/permissions";
import { ApiError, fetchJson, swrFetcher } from "@/lib/fetcher";
import type { UserRow } from "@/lib/services/users";
import { inviteUserSchema } from "@/lib/validations/user";
import { Loading, LoadError } from "./data-state";
import { ViewerSitesEditor } from "./viewer-sites-editor";

export function UsersManager({ currentUserId }: { currentUserId: string }) {
  const { data, error, isLoading, mutate } = useSWR<{ items: UserRow[] }>("/api/users", swrFetcher);
  const [notice, setNotice] = useState<string | null>(null);
  const [actionError, setActionError] = useState<string | null>(null);

  async function patchUser(id: string, patch: { role?: Role; status?: "active" | "deactivated" }) {
    setActionError(null);
    try {
      await fetchJson(`/api/users/${id}`, { method: "PATCH", body: JSON.stringify(patch) });
      setNotice(patch.role ? `Role changed to ${patch.role}.` : patch.status === "deactivated" ? "User deactivated." : "User reactivated.");
      await mutate();
    } catch (e) {
      setActionError((e as Error).message);
    }
  }

  return (
    <div className="space-y-6">
      <InviteForm onInvited={(email) => { setNotice(`Invite sent to ${email}.`); mutate(); }} />
      {notice && <p role="status" className="text-sm">{notice}</p>}
      {actionError && <p role="alert" className="text-sm text-critical">◆ {actionError}</p>}
      <section className="card overflow-x-auto" aria-labelledby="users-heading">
        <h2 id="users-heading" className="px-3 pt-3 text-lg font-bold">People</h2>
        {isLoading && <Loading />}
        {error && <LoadError error={error} retry={() => mutate()} />}
        {data && (
          <table className="table-dense w-full">
            <thead>
              <tr>
                <th scope="col">E-mail</th>
                <th scope="col">Name</th>
                <th scope="col">Role</th>
                <th scope="col">Status</th>
                <th scope="col"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody>
              {data.items.map((u) => (
                <tr key={u.id}>
                  <td>{u.email}</td>
                  <td>{u.name}</td>
                  <td>
                    <label className="sr-only" htmlFor={`role-${u.id}`}>Role of {u.email}</label>
                    <select
                      id={`role-${u.id}`}
                      className="field h-8 py-0"
                      value={u.role}
                      disabled={u.id === currentUserId}
                      onChange={(e) => patchUser(u.id, { role: e.target.value as Role })}
                    >
                      {ROLES.map((r) => <option key={r} value={r}>{r}</option>)}
                    </select>
                  </td>
                  <td>{u.status}</td>
                  <td className="text-right">
                    {u.id !== currentUserId && u.status === "active" && (
                      <button type="button" className="btn-quiet h-8" onClick={() => confirm(`Deactivate ${u.email}? They are signed out at once.`) && patchUser(u.id, { status: "deactivated" })}>
                        Deactivate
                      </button>
                    )}
                    {u.status === "deactivated" && (
                      <button type="button" className="btn-quiet h-8" onClick={() => patchUser(u.id, { status: "active" })}>
                        Reactivate
                      </button>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
      {data && <ViewerSitesEditor users={data.items} onSaved={() => mutate()} />}
    </div>
  );
}

function InviteForm({ onInvited }: { onInvited: (email: string) => void }) {
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [busy, setBusy] = useState(false);

  async function onSubmit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const formEl = event.currentTarget;
    const form = new FormData(formEl);
    const parsed = inviteUserSchema.safeParse({ email: form.get("email"), name: form.get("name"), role: form.get("role") });
    if (!parsed.success) {
      const f: Record<string, string> = {};
      for (const i of parsed.error.issues) f[String(i.path[0])] ??= i.message;
      return setErrors(f);
    }
    setErrors({});
    setBusy(true);
    try {
      await fetchJson("/api/users", { method: "POST", body: JSON.stringify(parsed.data) });
      formEl.reset();
      onInvited(parsed.data.email);
    } catch (e) {
      setErrors(e instanceof ApiError && e.fields ? e.fields : { _: (e as Error).message });
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={onSubmit} noValidate className="card grid gap-4 p-4 md:grid-cols-[2fr_2fr_1fr_auto] md:items-end" aria-labelledby="invite-heading">
      <h2 id="invite-heading" className="text-lg font-bold md:col-span-4">Invite someone</h2>
      <div>
        <label htmlFor="invite-email" className="label">E-mail</label>
        <input id="invite-email" name="email" type="email" className="field" />
        {errors.email && <p className="field-error">{errors.email}</p>}
      </div>
      <div>
        <label htmlFor="invite-name" className="label">Name</label>
        <input id="invite-name" name="name" className="field" />
      </div>
      <div>
        <label htmlFor="invite-role" className="label">Role</label>
        <select id="invite-role" name="role" className="field" defaultValue="technician">
          {ROLES.map((r) => <option key={r} value={r}>{r}</option>)}
        </select>
      </div>
      <button type="submit" className="btn" disabled={busy}>{busy ? "Sending…" : "Send invite"}</button>
      {errors._ && <p role="alert" className="field-error md:col-span-4">{errors._}</p>}
    </form>
  );
}
