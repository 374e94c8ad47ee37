"use client";

import useSWR from "swr";
import { useCallback, useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { createColumnHelper } from "@tanstack/react-table";
import type { z } from "zod";
import { ROLES, type Role } from "@/lib/auth/permissions";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import type { UserRow } from "@/lib/services/users";
import { inviteUserSchema } from "@/lib/validations/user";
import { DataTable } from "@/components/ui/data-table";
import { ConfirmDialog } from "@/components/ui/dialog";
import { Toast } from "@/components/ui/toast";
import { applyApiErrors } from "@/components/ui/form-fields";
import { ViewerSitesEditor } from "@/components/users/viewer-sites-editor";

// What each role may do (PRODUCT.md "People and roles"), said in the confirmation of a role change.
const ROLE_MAY: Record<Role, string> = {
  admin: "everything in the organisation: users and roles, sites, assets, devices and their keys, setpoints, imports",
  operator: "see everything; acknowledge and shelve alarms; edit setpoints and on-call lists",
  technician: "see everything; acknowledge alarms (also from the e-mail link); record manual dips; calibrate; commission channels",
  viewer: "read-only: dashboards, refill plan, exports",
};

type Patch = { role?: Role; status?: "active" | "deactivated" };
type Pending = { user: UserRow; patch: Patch };
type Done = { message: string; undo?: Pending };

const column = createColumnHelper<UserRow>();

export function UsersManager({ currentUserId }: { currentUserId: string }) {
  const { data, error, isLoading, mutate } = useSWR<{ items: UserRow[] }>("/api/users", swrFetcher);
  const [pending, setPending] = useState<Pending | null>(null);
  const [busy, setBusy] = useState(false);
  const [actionError, setActionError] = useState<string | null>(null);
  const [done, setDone] = useState<Done | null>(null);
  const dismiss = useCallback(() => setDone(null), []);

  /** Saves a change; the toast offers the opposite change as Undo. */
  async function apply({ user, patch }: Pending, undoable: boolean) {
    setBusy(true);
    setActionError(null);
    try {
      await fetchJson(`/api/users/${user.id}`, { method: "PATCH", body: JSON.stringify(patch) });
      const back: Patch = patch.role ? { role: user.role as Role } : { status: user.status === "active" ? "active" : "deactivated" };
      const message = patch.role ? `${user.email} is now ${patch.role}.` : patch.status === "deactivated" ? `${user.email} is deactivated.` : `${user.email} is active again.`;
      setDone({ message, undo: undoable ? { user: { ...user, ...patch }, patch: back } : undefined });
      setPending(null);
      await mutate();
    } catch (e) {
      setActionError((e as Error).message);
    } finally {
      setBusy(false);
    }
  }

  const columns = [
    column.accessor("email", { header: "E-mail" }),
    column.accessor("name", { header: "Name" }),
    column.accessor("role", {
      header: "Role",
      cell: ({ row: { original: u } }) => (
        <>
          <label className="sr-only" htmlFor={`role-${u.id}`}>Role of {u.email}</label>
          <select
            id={`role-${u.id}`}
            className="field w-auto py-1"
            value={u.role}
            disabled={u.id === currentUserId}
            onChange={(e) => {
              setActionError(null);
              setPending({ user: u, patch: { role: e.target.value as Role } });
            }}
          >
            {ROLES.map((r) => <option key={r} value={r}>{r}</option>)}
          </select>
        </>
      ),
    }),
    column.accessor("status", { header: "Status" }),
    column.display({
      id: "actions",
      header: () => <span className="sr-only">Actions</span>,
      meta: { cellClassName: "text-right" },
      cell: ({ row: { original: u } }) =>
        u.id !== currentUserId && u.status === "active" ? (
          <button type="button" className="btn-quiet" onClick={() => setPending({ user: u, patch: { status: "deactivated" } })}>Deactivate</button>
        ) : u.status === "deactivated" ? (
          <button type="button" className="btn-quiet" onClick={() => apply({ user: u, patch: { status: "active" } }, true)}>Reactivate</button>
        ) : null,
    }),
  ];

  return (
    <div className="space-y-6">
      <InviteForm onInvited={(email) => { setDone({ message: `Invite sent to ${email}.` }); mutate(); }} />
      {actionError && !pending && <p role="alert" className="field-error">{actionError}</p>}
      <div>
        <h2 id="users-heading" className="mb-2 text-lg font-bold">People</h2>
        <DataTable data={data?.items} columns={columns} getRowId={(u) => u.id} label="People" loading={isLoading} error={error} retry={() => mutate()} empty="No one yet." />
      </div>
      {data && <ViewerSitesEditor users={data.items} onSaved={() => mutate()} />}
      {pending?.patch.role && (
        <ConfirmDialog
          title={`Make ${pending.user.email} ${pending.patch.role === "admin" || pending.patch.role === "operator" ? "an" : "a"} ${pending.patch.role}?`}
          confirmLabel={`Change role to ${pending.patch.role}`}
          busy={busy}
          error={actionError}
          onConfirm={() => apply(pending, true)}
          onCancel={() => setPending(null)}
        >
          <p>
            Now <span className="font-bold">{pending.user.role}</span>: {ROLE_MAY[pending.user.role as Role]}.
          </p>
          <p>
            As <span className="font-bold">{pending.patch.role}</span>: {ROLE_MAY[pending.patch.role]}.
          </p>
          <p className="text-muted">The change takes effect on their next request.</p>
        </ConfirmDialog>
      )}
      {pending?.patch.status === "deactivated" && (
        <ConfirmDialog
          title={`Deactivate ${pending.user.email}?`}
          confirmLabel="Deactivate"
          busy={busy}
          error={actionError}
          onConfirm={() => apply(pending, true)}
          onCancel={() => setPending(null)}
        >
          <p>They are signed out at once and cannot sign in until reactivated. Their audit trail stays.</p>
        </ConfirmDialog>
      )}
      {done && <Toast message={done.message} onDismiss={dismiss} onUndo={done.undo && (() => { const undo = done.undo!; setDone(null); apply(undo, false); })} />}
    </div>
  );
}

type InviteInput = z.input<typeof inviteUserSchema>;

function InviteForm({ onInvited }: { onInvited: (email: string) => void }) {
  const form = useForm<InviteInput, unknown, z.output<typeof inviteUserSchema>>({ resolver: zodResolver(inviteUserSchema), defaultValues: { email: "", name: "", role: "technician" } });
  const { register, handleSubmit, formState: { errors, isSubmitting } } = form;

  const onSubmit = handleSubmit(async (input) => {
    try {
      await fetchJson("/api/users", { method: "POST", body: JSON.stringify(input) });
      form.reset();
      onInvited(input.email);
    } catch (e) {
      applyApiErrors(form, e);
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="card grid gap-4 p-4 md:grid-cols-[2fr_2fr_1fr_auto] md:items-end" aria-labelledby="invite-heading">
      <h2 id="invite-heading" className="text-lg font-bold md:col-span-4">Invite someone</h2>
      <div>
        <label htmlFor="invite-email" className="label">E-mail</label>
        <input id="invite-email" type="email" className="field" aria-invalid={errors.email ? true : undefined} {...register("email")} />
        {errors.email && <p className="field-error">{errors.email.message}</p>}
      </div>
      <div>
        <label htmlFor="invite-name" className="label">Name</label>
        <input id="invite-name" className="field" {...register("name")} />
        {errors.name && <p className="field-error">{errors.name.message}</p>}
      </div>
      <div>
        <label htmlFor="invite-role" className="label">Role</label>
        <select id="invite-role" className="field" {...register("role")}>
          {ROLES.map((r) => <option key={r} value={r}>{r}</option>)}
        </select>
      </div>
      <button type="submit" className="btn" disabled={isSubmitting}>{isSubmitting ? "Sending…" : "Send invite"}</button>
      {errors.root && <p role="alert" className="field-error md:col-span-4">{errors.root.message}</p>}
    </form>
  );
}
