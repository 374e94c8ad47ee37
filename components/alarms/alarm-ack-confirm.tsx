"use client";

import Link from "next/link";
import { useState } from "react";
import { fetchJson } from "@/lib/fetcher";
import type { AlarmState } from "@/lib/alarms/state-machine";
import { ackLinkSchema } from "@/lib/validations/alarm";
import { AlarmStateLabel } from "@/components/alarms/alarm-badges";

/** What the link is about (the page's rows) and the state it is in now. */
export function AlarmFacts({ details, state }: { details: React.ReactNode; state: React.ReactNode }) {
  return (
    <dl className="card mb-4 grid grid-cols-[auto,1fr] gap-x-4 gap-y-2 p-4 text-sm">
      {details}
      <dt className="font-bold">State</dt>
      <dd>{state}</dd>
    </dl>
  );
}

/**
 * The question, the alarm's facts and the button behind an e-mail's acknowledge link: only this POST
 * acknowledges, so a mail scanner opening the link changes nothing. Once done, the heading and the state
 * say so instead of asking again.
 */
export function AlarmAckConfirm({ token, recipient, state, details, children }: { token: string; recipient: string; state: AlarmState; details: React.ReactNode; children: React.ReactNode }) {
  const [comment, setComment] = useState("");
  const [status, setStatus] = useState<{ kind: "idle" | "busy" | "done" } | { kind: "error"; message: string }>({ kind: "idle" });

  async function onSubmit(event: React.FormEvent) {
    event.preventDefault();
    const parsed = ackLinkSchema.safeParse({ token, ...(comment.trim() ? { comment: comment.trim() } : {}) });
    if (!parsed.success) return setStatus({ kind: "error", message: parsed.error.issues[0].message });
    setStatus({ kind: "busy" });
    try {
      await fetchJson("/api/alarms/ack-link", { method: "POST", body: JSON.stringify(parsed.data) });
      setStatus({ kind: "done" });
    } catch (e) {
      setStatus({ kind: "error", message: (e as Error).message });
    }
  }

  if (status.kind === "done") {
    // Acknowledging an active alarm leaves it acknowledged; one that had returned to normal goes to normal.
    const after: AlarmState = state === "returned_unacknowledged" ? "normal" : "acknowledged";
    return (
      <>
        <h1 className="mb-4 text-2xl font-bold">Alarm acknowledged</h1>
        <AlarmFacts details={details} state={<AlarmStateLabel state={after} />} />
        <p role="status" className="border-l-4 border-rule bg-card px-3 py-2">
          Acknowledged as {recipient}. <Link href="/alarms" className="font-bold underline">Open the alarms</Link>
        </p>
      </>
    );
  }
  return (
    <>
      <h1 className="mb-1 text-2xl font-bold">Acknowledge this alarm?</h1>
      <p className="mb-4 text-sm text-muted">{children}</p>
      <AlarmFacts details={details} state={<AlarmStateLabel state={state} />} />
      <form onSubmit={onSubmit} noValidate className="space-y-4">
        <div>
          <label htmlFor="ack-comment" className="label">Comment (optional)</label>
          <textarea id="ack-comment" className="field" rows={2} value={comment} onChange={(e) => setComment(e.target.value)} />
        </div>
        {status.kind === "error" && <p role="alert" className="field-error">{status.message}</p>}
        <button type="submit" className="btn h-12 w-full" disabled={status.kind === "busy"}>{status.kind === "busy" ? "Acknowledging…" : "Acknowledge"}</button>
      </form>
    </>
  );
}
