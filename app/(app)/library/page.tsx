import type { Metadata } from 'next';
import Link from 'next/link';
import { Cautions } from '@/components/assumptions/cautions';
import { LibraryFiltersForm } from '@/components/assumptions/library-filters-form';
import { LibraryTable } from '@/components/assumptions/library-table';
import { MatrixLibraryTable } from '@/components/factor-matrices/matrix-library-table';
import { libraryFiltersSchema, libraryStateLabels } from '@/lib/assumptions/library-filters';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { listLibrary } from '@/lib/dal/assumptions';
import { listMatrixLibrary } from '@/lib/dal/factor-matrices';
import { count } from '@/lib/format';

export const metadata: Metadata = { title: 'Library' };

type Search = { segment?: string; state?: string; asOf?: string };

/** The library: filters in the address (segment, state, as-of date), the cautions beside the values, the table. */
export default async function LibraryPage({ searchParams }: { searchParams: Promise<Search> }) {
  const actor = await requireUser();
  const raw = await searchParams;
  const values = { segment: typeof raw.segment === 'string' ? raw.segment : undefined, state: typeof raw.state === 'string' ? raw.state : undefined, asOf: typeof raw.asOf === 'string' ? raw.asOf : undefined };
  const parsed = libraryFiltersSchema.safeParse(values);
  const errors: Record<string, string> = {};
  if (!parsed.success) for (const i of parsed.error.issues) errors[String(i.path[0])] ??= i.message;
  // A filter that cannot be read is shown at its field; the others still apply.
  const filters = parsed.success ? parsed.data : Object.fromEntries(Object.entries(values).filter(([k]) => !errors[k]));
  const [library, all, matrices] = await Promise.all([listLibrary(actor, new Date(), filters), listLibrary(actor), listMatrixLibrary(actor)]);
  const f = libraryFiltersSchema.parse(filters);
  const described = [
    f?.segment ? `segment contains “${f.segment}”` : null,
    f?.state ? libraryStateLabels[f.state].toLowerCase() : null,
    f?.asOf ? `in force on ${f.asOf}` : null,
  ].filter(Boolean);
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <h1>Library</h1>
          <p className="text-sm text-[var(--color-muted)]">Correlation assumptions by segment, with the value to use, its interval, PD and dates.</p>
        </div>
        <div className="ml-auto flex flex-wrap gap-2">
          <a className="btn btn-quiet" href="/api/assumptions/export" download>
            Export CSV
          </a>
          {can(actor.role, 'assumptions:draft') ? (
            <Link className="btn no-underline" href="/library/new">
              Draft an assumption
            </Link>
          ) : null}
        </div>
      </div>
      <LibraryFiltersForm values={values} errors={errors} segments={all.map((e) => e.segment)} />
      <p className="text-sm" role="status" data-testid="library-count">
        {described.length ? `${library.length} of ${count(all.length, 'segment')}: ${described.join(', ')}.` : `${count(all.length, 'segment')}.`}
      </p>
      <Cautions compact columns title="Read these values with care." />
      <LibraryTable
        entries={library}
        showPending={actor.role !== 'viewer'}
        emptyText={
          described.length
            ? 'No segment matches these filters.'
            : `Nothing published yet.${can(actor.role, 'assumptions:draft') ? ' Draft an assumption from a finished fit to start.' : ''}`
        }
      />
      <section className="panel space-y-2 p-4" aria-labelledby="matrices-heading">
        <h2 id="matrices-heading">Factor-correlation matrices</h2>
        <p className="text-sm text-[var(--color-muted)]">
          Correlations between the segments&apos; systematic factors, each matrix an assumption of its own kind under the same review, for portfolio and
          economic-capital models (not Pillar 1).
        </p>
        <MatrixLibraryTable entries={matrices} />
      </section>
      <p className="text-sm text-[var(--color-muted)]">
        Downstream models read these values through the consumer API (<a href="/api/openapi.json">OpenAPI document</a>) with a token an
        administrator creates; the export CSV carries the cautions as comment lines. The matrices are read at /api/v1/factor-matrices and exported as a long CSV (a row per pair) at /api/v1/factor-matrices/export.
      </p>
    </div>
  );
}
