import Link from 'next/link';
import type { LibraryEntryDto } from '@/lib/dal/assumptions';
import { EvidenceBadge } from './evidence-badge';

/** The Overview's list of values whose evidence has aged, with the backtest verdict when it has run. */
export function AgedEvidenceOverview({ library }: { library: LibraryEntryDto[] }) {
  const aged = library.filter((e) => e.current && e.evidence?.flagged);
  return (
    <section className="panel p-5" aria-label="Evidence that has aged">
      <div className="flex items-baseline justify-between">
        <h2>Evidence that has aged</h2>
        <Link href="/library" className="text-sm">
          Open the library
        </Link>
      </div>
      {aged.length === 0 ? (
        <p className="mt-2 text-sm text-[var(--color-muted)]">No value rests on superseded data or misses newer years.</p>
      ) : (
        <ul className="mt-2 space-y-1 text-sm" data-testid="aged-evidence">
          {aged.slice(0, 6).map((e) => (
            <li key={e.assumptionId} className="flex flex-wrap items-center gap-x-2">
              <Link href={`/library/versions/${e.current!.id}`}>
                {e.segment} v{e.current!.version}
              </Link>
              <EvidenceBadge evidence={e.evidence} />
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
