"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import { useState } from "react";

export function NavLinks({ items }: { items: { href: string; label: string }[] }) {
  const pathname = usePathname();
  const [open, setOpen] = useState(false);
  const isCurrent = (href: string) => (href === "/" ? pathname === "/" : pathname.startsWith(href));
  const links = (
    <ul className="flex flex-col gap-1 md:flex-row md:gap-4">
      {items.map((item) => (
        <li key={item.href}>
          <Link
            href={item.href}
            onClick={() => setOpen(false)}
            aria-current={isCurrent(item.href) ? "page" : undefined}
            className="block border-b-2 border-transparent py-2 text-sm hover:border-rule aria-[current=page]:border-ink aria-[current=page]:font-bold"
          >
            {item.label}
          </Link>
        </li>
      ))}
    </ul>
  );
  return (
    <nav aria-label="Main" className="md:flex-1">
      <div className="hidden md:block">{links}</div>
      <div className="md:hidden">
        <button type="button" className="btn-quiet h-9" aria-expanded={open} aria-controls="mobile-nav" onClick={() => setOpen((v) => !v)}>
          Menu
        </button>
        {open && (
          <div id="mobile-nav" className="absolute left-0 right-0 z-20 border-b border-rule bg-card px-4 py-2">
            {links}
          </div>
        )}
      </div>
    </nav>
  );
}
