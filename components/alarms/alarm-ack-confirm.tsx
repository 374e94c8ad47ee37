"use client";

import Link from "next/link";
import { useState } from "react";
import { fetchJson } from "@/lib/fetcher";
import { ackLinkSchema } from "@/lib/validations/alarm";

/** The button behind an e-mail's acknowledge link: only this POST acknowledges, so a mail scanner opening the link changes nothing. */
export function AlarmAckConfirm({ token, recipient }: { token: string; recipient: string }) {
  const [comment, setComment] = useState("");
  const [state, setState] = useState<{ kind: "idle" | "busy" | "done" } | { kind: "error"; message: string }>({ kind: "idle" });

  async function onSubmit(event: React.FormEvent) {
    event.preventDefault();
    const parsed = ackLinkSchema.safeParse({ token, ...(comment.trim() ? { comment: comment.trim() } : {}) });
    if (!parsed.success) return setState({ kind: "error", message: parsed.error.issues[0].message });
    setState({ kind: "busy" });
    try {
      await fetchJson("/api/alarms/ack-link", { method: "POST", body: JSON.stringify(parsed.data) });
      setState({ kind: "done" });
    } catch (e) {
      setState({ kind: "error", message: (e as Error).message });
    }
  }

  if (state.kind === "done") {
    return (
      <p role="status" className="border-l-4 border-rule bg-card px-3 py-2">
        Acknowledged as {recipient}. <Link href="/alarms" className="font-bold underline">Open the alarms</Link>
      </p>
    );
  }
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4">
      <div>
        <label htmlFor="ack-comment" className="label">Comment (optional)</label>
        <textarea id="ack-comment" className="field" rows={2} value={comment} onChange={(e) => setComment(e.target.value)} />
      </div>
      {state.kind === "error" && <p role="alert" className="field-error"><span aria-hidden="true">◆ </span>{state.message}</p>}
      <button type="submit" className="btn w-full" disabled={state.kind === "busy"}>{state.kind === "busy" ? "Acknowledging…" : "Acknowledge"}</button>
    </form>
  );
}
