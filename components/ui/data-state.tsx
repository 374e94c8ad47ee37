/** Loading and error states every data widget shows while it waits or when its request fails. */
export function Loading({ label = "Loading…" }: { label?: string }) {
  return (
    <p role="status" className="px-3 py-6 text-sm text-muted">
      {label}
    </p>
  );
}

export function LoadError({ error, retry }: { error: Error; retry?: () => void }) {
  return (
    <div role="alert" className="flex items-center gap-3 border-l-4 border-critical bg-card px-3 py-3 text-sm">
      <span>Could not load: {error.message}</span>
      {retry && (
        <button type="button" className="btn-quiet md:h-8" onClick={retry}>
          Try again
        </button>
      )}
    </div>
  );
}
