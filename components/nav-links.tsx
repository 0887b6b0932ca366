"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";

export function NavLinks({ items }: { items: { href: string; label: string }[] }) {
  const path = usePathname();
  // The entry whose address is the longest match is the current page ("/review/scenarios" is not the queue at "/review").
  const current = items
    .filter((item) => path === item.href || path.startsWith(`${item.href}/`))
    .sort((a, b) => b.href.length - a.href.length)[0]?.href;
  return (
    <nav aria-label="Main" className="flex flex-wrap gap-1">
      {items.map((item) => {
        const active = item.href === current;
        return (
          <Link
            key={item.href}
            href={item.href}
            aria-current={active ? "page" : undefined}
            className={`rounded px-3 py-1 text-sm text-white hover:bg-white/10 hover:text-white ${active ? "bg-white/20 font-semibold" : ""}`}
          >
            {item.label}
          </Link>
        );
      })}
    </nav>
  );
}
