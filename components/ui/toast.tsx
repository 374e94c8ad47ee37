"use client";

import { useEffect } from "react";

/** A note of what just happened, with an Undo while it is shown (20 s), announced to screen readers. */
export function Toast({ message, onUndo, onDismiss }: { message: string; onUndo?: () => void; onDismiss: () => void }) {
  useEffect(() => {
    const timer = setTimeout(onDismiss, 20_000);
    return () => clearTimeout(timer);
  }, [message, onDismiss]);
  return (
    <div role="status" className="fixed inset-x-4 bottom-4 z-40 mx-auto flex max-w-md items-center gap-3 rounded border border-ink bg-ink px-4 py-2 text-sm text-paper shadow-lg">
      <span className="flex-1">{message}</span>
      {onUndo && (
        <button type="button" className="min-h-11 px-2 font-bold underline" onClick={onUndo}>
          Undo
        </button>
      )}
      <button type="button" className="min-h-11 px-2" aria-label="Dismiss" onClick={onDismiss}>
        ×
      </button>
    </div>
  );
}
