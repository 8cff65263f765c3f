import Link from 'next/link';

/**
 * Where the page sits: its ancestors as links and the page itself named last (aria-current), so a
 * reader always sees the name of the page they are on.
 */
export function Breadcrumbs({ trail, current }: { trail: { href: string; label: string }[]; current: string }) {
  return (
    <nav aria-label="Breadcrumb" className="text-sm">
      <ol className="flex flex-wrap items-center gap-x-1.5 text-[var(--color-muted)]">
        {trail.map((t) => (
          <li key={t.href} className="flex items-center gap-x-1.5">
            <Link href={t.href}>{t.label}</Link>
            <span aria-hidden="true">/</span>
          </li>
        ))}
        <li aria-current="page" className="text-[var(--color-ink)]">
          {current}
        </li>
      </ol>
    </nav>
  );
}
