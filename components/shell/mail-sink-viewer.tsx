"use client";

import useSWR from "swr";
import { useState } from "react";
import { formatDistanceToNow } from "date-fns";
import { swrFetcher } from "@/lib/fetcher";
import type { CaughtMessage } from "@/lib/mail/sink-client";
import { Loading, LoadError } from "@/components/ui/data-state";

type Summary = Omit<CaughtMessage, "text" | "html">;

export function MailSinkViewer() {
  const list = useSWR<{ configured: boolean; items: Summary[] }>("/api/mail", swrFetcher, { refreshInterval: 5000 });
  const [selected, setSelected] = useState<string | null>(null);
  const message = useSWR<CaughtMessage>(selected ? `/api/mail/${selected}` : null, swrFetcher);

  return (
    <div className="grid gap-4 md:grid-cols-[1fr_1.4fr]">
      <section className="card" aria-label="Caught messages">
        {list.isLoading && <Loading />}
        {list.error && <LoadError error={list.error} retry={() => list.mutate()} />}
        {list.data && !list.data.configured && <p className="p-3 text-sm text-muted">No mail sink is configured (MAIL_SINK_URL).</p>}
        {list.data?.configured && list.data.items.length === 0 && <p className="p-3 text-sm text-muted">Nothing caught yet.</p>}
        <ul>
          {list.data?.items.map((m) => (
            <li key={m.id} className="border-b border-rule last:border-0">
              <button type="button" onClick={() => setSelected(m.id)} aria-current={selected === m.id} className="w-full px-3 py-2 text-left hover:bg-paper aria-[current=true]:bg-paper">
                <span className="block font-bold">{m.subject || "(no subject)"}</span>
                <span className="block text-sm text-muted">
                  to {m.to.join(", ")} · {formatDistanceToNow(new Date(m.received_at), { addSuffix: true })}
                </span>
              </button>
            </li>
          ))}
        </ul>
      </section>
      <section className="card p-4" aria-label="Message">
        {!selected && <p className="text-sm text-muted">Choose a message to read it.</p>}
        {selected && message.isLoading && <Loading />}
        {message.error && <LoadError error={message.error} />}
        {message.data && (
          <article>
            <h2 className="text-lg font-bold">{message.data.subject}</h2>
            <p className="mb-4 text-sm text-muted">From {message.data.from} to {message.data.to.join(", ")} · {new Date(message.data.received_at).toLocaleString()}</p>
            <pre className="whitespace-pre-wrap break-words font-sans text-sm" data-testid="mail-body">{message.data.text}</pre>
          </article>
        )}
      </section>
    </div>
  );
}
