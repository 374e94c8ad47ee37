/** Halftrip's mark: a mast with the outgoing ping and its returning echo, then the name. */
export function Wordmark({ className = "" }: { className?: string }) {
  return (
    <span className={`inline-flex items-center gap-2 ${className}`}>
      <svg viewBox="0 0 20 32" className="h-7 w-5" aria-hidden="true">
        <path d="M3 26V6" stroke="currentColor" strokeWidth="3" strokeLinecap="round" />
        <path d="M8 10a8 8 0 0 1 0 12M13 6.5a13 13 0 0 1 0 19" fill="none" stroke="#8ea3ad" strokeWidth="3" strokeLinecap="round" />
      </svg>
      <span className="text-xl font-bold tracking-wide">halftrip</span>
    </span>
  );
}
