"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import { useState } from "react";

type Section = { title: string; items: { href: string; label: string }[] };

/** The sections of the main navigation: a column beside the page on wide screens, a menu on phones. */
export function NavLinks({ sections }: { sections: Section[] }) {
  const pathname = usePathname();
  const [open, setOpen] = useState(false);
  const isCurrent = (href: string) => (href === "/" ? pathname === "/" : pathname === href || pathname.startsWith(`${href}/`));
  return (
    <nav aria-label="Main" className="md:w-48 md:shrink-0">
      <button
        type="button"
        className="btn-quiet md:h-9 md:hidden"
        aria-expanded={open}
        aria-controls="main-nav-sections"
        onClick={() => setOpen((v) => !v)}
      >
        Menu
      </button>
      <div id="main-nav-sections" className={`${open ? "block" : "hidden"} mt-2 space-y-4 md:mt-0 md:block`}>
        {sections.map((section) => (
          <div key={section.title}>
            <p className="mb-1 text-xs font-bold uppercase tracking-wide text-muted">{section.title}</p>
            <ul>
              {section.items.map((item) => (
                <li key={item.href}>
                  <Link
                    href={item.href}
                    onClick={() => setOpen(false)}
                    aria-current={isCurrent(item.href) ? "page" : undefined}
                    className="block border-l-2 border-transparent py-1.5 pl-2 text-sm hover:border-rule aria-[current=page]:border-ink aria-[current=page]:font-bold"
                  >
                    {item.label}
                  </Link>
                </li>
              ))}
            </ul>
          </div>
        ))}
      </div>
    </nav>
  );
}
