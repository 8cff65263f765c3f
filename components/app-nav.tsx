'use client';

import Link from 'next/link';
import { usePathname } from 'next/navigation';
import { activeNavHref } from '@/lib/nav';

export function AppNav({ items }: { items: { href: string; label: string }[] }) {
  const pathname = usePathname();
  const activeHref = activeNavHref(
    items.map((i) => i.href),
    pathname,
  );
  return (
    <nav aria-label="Main" className="flex flex-wrap gap-1">
      {items.map((item) => {
        const active = item.href === activeHref;
        return (
          <Link
            key={item.href}
            href={item.href}
            aria-current={active ? 'page' : undefined}
            className={`rounded px-3 py-1.5 text-sm no-underline ${
              active ? 'bg-[var(--color-accent)] text-white' : 'text-[var(--color-ink)] hover:bg-[var(--color-accent-soft)]'
            }`}
          >
            {item.label}
          </Link>
        );
      })}
    </nav>
  );
}
