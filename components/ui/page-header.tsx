import Link from "next/link";

/** Title with its path above it and one line of key facts, as every page starts. */
export function PageHeader({ title, path = [], facts, actions }: { title: string; path?: { href: string; label: string }[]; facts?: React.ReactNode; actions?: React.ReactNode }) {
  return (
    <div className="mb-6 flex flex-wrap items-end gap-4">
      <div className="min-w-0 flex-1">
        {path.length > 0 && (
          <nav aria-label="Breadcrumb" className="mb-1 text-sm text-muted">
            {path.map((p, i) => (
              <span key={p.href}>
                {i > 0 && <span aria-hidden="true"> › </span>}
                <Link href={p.href} className="hover:underline max-md:inline-flex max-md:min-h-11 max-md:items-center">{p.label}</Link>
              </span>
            ))}
          </nav>
        )}
        <h1 className="text-2xl font-bold">{title}</h1>
        {facts && <p className="mt-1 text-sm text-muted">{facts}</p>}
      </div>
      {actions && <div className="flex flex-wrap gap-3">{actions}</div>}
    </div>
  );
}
