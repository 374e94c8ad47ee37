"use client";

import { useEffect, useId, useRef } from "react";

// Modal dialogs on the browser's own <dialog>: it traps focus, closes on Escape and returns focus to
// what opened it.

export function Dialog({ title, onClose, children }: { title: string; onClose: () => void; children: React.ReactNode }) {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  useEffect(() => {
    const dialog = ref.current;
    if (dialog && !dialog.open) dialog.showModal();
    // showModal focuses the first control; a dialog may name a safer one (Cancel) with data-autofocus.
    dialog?.querySelector<HTMLElement>("[data-autofocus]")?.focus();
    return () => dialog?.close();
  }, []);
  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      className="card w-[calc(100%-2rem)] max-w-md p-4 text-ink shadow-lg backdrop:bg-ink/30"
      onCancel={(e) => {
        e.preventDefault();
        onClose();
      }}
      onMouseDown={(e) => e.target === e.currentTarget && onClose()}
    >
      <h2 id={titleId} className="mb-3 text-lg font-bold">{title}</h2>
      {children}
    </dialog>
  );
}

/** Asks before a destructive or privilege-changing step; says what will happen in `children`. */
export function ConfirmDialog({
  title,
  confirmLabel,
  busy = false,
  error,
  onConfirm,
  onCancel,
  children,
}: {
  title: string;
  confirmLabel: string;
  busy?: boolean;
  error?: string | null;
  onConfirm: () => void;
  onCancel: () => void;
  children: React.ReactNode;
}) {
  return (
    <Dialog title={title} onClose={onCancel}>
      <div className="mb-4 space-y-2 text-sm">{children}</div>
      {error && <p role="alert" className="field-error mb-4">{error}</p>}
      <div className="flex flex-wrap gap-3">
        <button type="button" className="btn" disabled={busy} onClick={onConfirm}>{busy ? "Saving…" : confirmLabel}</button>
        <button type="button" className="btn-quiet" data-autofocus onClick={onCancel}>Cancel</button>
      </div>
    </Dialog>
  );
}
