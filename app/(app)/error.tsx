"use client";

export default function SignedInError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div role="alert" className="card border-l-4 border-l-critical p-6">
      <h1 className="mb-2 text-xl font-bold">This page failed to load</h1>
      <p className="mb-4 text-sm text-muted">{error.digest ? `Reference ${error.digest}. ` : ""}The error is logged on the server.</p>
      <button type="button" className="btn-quiet" onClick={reset}>Try again</button>
    </div>
  );
}
