export default function SignedInLoading() {
  return <p role="status" className="text-sm text-muted">Loading…</p>;
}
