import type { Metadata } from 'next';
import Link from 'next/link';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { listFits } from '@/lib/dal/fits';
import { FitsTable } from '@/components/fits/fits-table';

export const metadata: Metadata = { title: 'Fits' };

export default async function FitsPage({ searchParams }: { searchParams: Promise<{ segment?: string }> }) {
  const actor = await requireUser();
  const { segment } = await searchParams;
  const fits = await listFits(actor);
  const shown = segment ? fits.filter((f) => f.segments.includes(segment)) : fits;
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <h1>Fits</h1>
          <p className="mt-1 text-sm text-[var(--color-muted)]">
            Each run estimates the correlation of the chosen segments of one dataset. Tick two or more finished runs that share a segment to
            compare them.
          </p>
        </div>
        {can(actor.role, 'fits:run') ? (
          <Link href="/fits/new" className="btn no-underline">
            New fit
          </Link>
        ) : null}
      </div>
      {segment ? (
        <p className="text-sm">
          Runs that include <strong>{segment}</strong> · <Link href="/fits">show all</Link>
        </p>
      ) : null}
      <FitsTable fits={shown} segment={segment} />
    </div>
  );
}
