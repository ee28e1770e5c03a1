"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";

export type NavLinksProps = { items: { href: string; label: string; hint: string }[] };

export function NavLinks({ items }: NavLinksProps) {
  const pathname = usePathname();
  return (
    <nav aria-label="Main" className="flex flex-col gap-0.5 px-2">
      {items.map((item) => {
        const active = pathname === item.href || pathname.startsWith(`${item.href}/`);
        return (
          <Link
            key={item.href}
            href={item.href}
            title={item.hint}
            aria-current={active ? "page" : undefined}
            className={`rounded-md px-3 py-2 text-sm font-medium transition-colors ${
              active ? "bg-clay-600/25 text-clay-200" : "text-soot-200 hover:bg-soot-800 hover:text-soot-50"
            }`}
          >
            {item.label}
          </Link>
        );
      })}
    </nav>
  );
}
