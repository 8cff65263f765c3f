'use client';

import Link from 'next/link';
import { usePathname } from 'next/navigation';

export function AppNav({ items }: { items: { href: string; label: string }[] }) {
  const pathname = usePathname();
  return (
    <nav aria-label="Main" className="flex flex-wrap gap-1">
      {items.map((item) => {
        const active = item.href === '/' ? pathname === '/' : pathname === item.href || pathname.startsWith(item.href + '/');
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
