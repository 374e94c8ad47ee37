"use client";

import { useState } from "react";
import { fetchJson } from "@/lib/fetcher";
import { ConfirmDialog } from "@/components/ui/dialog";
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

/** Rotate and revoke, each behind the kit's confirmation; a rotated key is shown once. */
export function DeviceKeyActions({ deviceId, hasActiveKey, onChanged }: { deviceId: string; hasActiveKey: boolean; onChanged: () => void }) {
  const [asking, setAsking] = useState<KeyAction | null>(null);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [newKey, setNewKey] = useState<string | null>(null);

  function ask(next: KeyAction) {
    setAsking(next);
    setError(null);
  }

  async function confirm(action: KeyAction) {
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
      setAsking(null);
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
      {asking && (
        <ConfirmDialog
          title={WORDING[asking].title}
          confirmLabel={WORDING[asking].verb}
          busy={busy}
          error={error}
          onConfirm={() => confirm(asking)}
          onCancel={() => setAsking(null)}
        >
          <p>{WORDING[asking].body}</p>
        </ConfirmDialog>
      )}
    </div>
  );
}
