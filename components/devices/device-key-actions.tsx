"use client";

import { useRef, useState } from "react";
import { fetchJson } from "@/lib/fetcher";
import { DeviceKeyReveal } from "@/components/devices/device-key-reveal";

type KeyAction = "rotate" | "revoke";

const WORDING: Record<KeyAction, { title: string; body: string; verb: string }> = {
  rotate: {
    title: "Rotate this device's key?",
    body: "A new key is issued and shown once. The current key stops working at once: the device cannot send readings until it has the new key.",
    verb: "Rotate key",
  },
  revoke: {
    title: "Revoke this device's key?",
    body: "Every key of this device stops working at once. It cannot send readings until you rotate a new key.",
    verb: "Revoke key",
  },
};

/** Rotate and revoke, each behind a modal confirmation; a rotated key is shown once. */
export function DeviceKeyActions({ deviceId, hasActiveKey, onChanged }: { deviceId: string; hasActiveKey: boolean; onChanged: () => void }) {
  const dialog = useRef<HTMLDialogElement>(null);
  const [action, setAction] = useState<KeyAction>("rotate");
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [newKey, setNewKey] = useState<string | null>(null);
  const wording = WORDING[action];

  function ask(next: KeyAction) {
    setAction(next);
    setError(null);
    dialog.current?.showModal();
  }

  async function confirm() {
    setBusy(true);
    setError(null);
    try {
      if (action === "rotate") {
        const { api_key } = await fetchJson<{ api_key: string }>(`/api/devices/${deviceId}/key`, { method: "POST" });
        setNewKey(api_key);
        setNotice(null);
      } else {
        const { revoked } = await fetchJson<{ revoked: number }>(`/api/devices/${deviceId}/key`, { method: "DELETE" });
        setNewKey(null);
        setNotice(`${revoked === 1 ? "The key is" : `${revoked} keys are`} revoked; the device can no longer send readings.`);
      }
      dialog.current?.close();
      onChanged();
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap gap-3">
        <button type="button" className="btn-quiet" onClick={() => ask("rotate")}>Rotate key</button>
        <button type="button" className="btn-quiet" onClick={() => ask("revoke")} disabled={!hasActiveKey}>Revoke key</button>
      </div>
      {notice && <p role="status" className="text-sm">{notice}</p>}
      {newKey && <DeviceKeyReveal apiKey={newKey} heading="The new key" />}
      <dialog ref={dialog} aria-labelledby="key-dialog-title" aria-describedby="key-dialog-body" className="card fixed inset-0 m-auto h-fit max-w-md p-6 text-ink backdrop:bg-ink/40">
        <h2 id="key-dialog-title" className="mb-2 text-lg font-bold">{wording.title}</h2>
        <p id="key-dialog-body" className="mb-4 text-sm">{wording.body}</p>
        {error && <p role="alert" className="field-error mb-4">{error}</p>}
        <div className="flex flex-wrap justify-end gap-3">
          <button type="button" className="btn-quiet" onClick={() => dialog.current?.close()}>Cancel</button>
          <button type="button" className="btn" onClick={confirm} disabled={busy}>{busy ? "Working…" : wording.verb}</button>
        </div>
      </dialog>
    </div>
  );
}
