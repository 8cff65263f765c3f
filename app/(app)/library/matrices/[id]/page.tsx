import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { z } from 'zod';
import { PublicationLine } from '@/components/assumptions/publication-line';
import { AuditTable } from '@/components/assumptions/audit-table';
import { StatusBadge } from '@/components/assumptions/status-badge';
import { TransitionPanel } from '@/components/assumptions/transition-panel';
import { VersionCautions } from '@/components/assumptions/version-cautions';
import { Heatmap } from '@/components/fits/correlation-heatmap';
import { Breadcrumbs } from '@/components/layout/breadcrumbs';
import { ScrollBox } from '@/components/layout/scroll-box';
import { MatrixDraftForm } from '@/components/factor-matrices/matrix-draft-form';
import { todayIso } from '@/lib/assumptions/dates';
import { editableStatuses, statusLabels } from '@/lib/assumptions/lifecycle';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { getMatrixVersionPage } from '@/lib/dal/factor-matrices';
import { AppError } from '@/lib/errors';
import { matrixCautions } from '@/lib/factor-matrices/cautions';
import { interval, level, rho, seedsText } from '@/lib/format';

export const metadata: Metadata = { title: 'Factor-correlation matrix' };

const label = (s: string) => statusLabels[s as keyof typeof statusLabels] ?? s;
const when = (s: string | null) => (s ? `${s.replace('T', ' ').slice(0, 16)} UTC` : '—');
const r4 = (x: number | null) => (x === null ? '—' : x.toFixed(4));

/** A factor-correlation matrix version: its value as a heat map, the pairs with intervals, lineage, decisions and audit trail. */
export default async function MatrixVersionPage({ params }: { params: Promise<{ id: string }> }) {
  const actor = await requireUser();
  const id = z.coerce.number().int().positive().safeParse((await params).id);
  if (!id.success) notFound();
  const page = await getMatrixVersionPage(actor, id.data).catch((err) => {
    if (err instanceof AppError && err.kind === 'not_found') notFound();
    throw err;
  });
  const v = page.version;
  const idx = new Map(v.segments.map((s, i) => [s, i]));
  const title = `Matrix of ${v.segments.join(', ')}`;
  return (
    <div className="space-y-5">
      <div>
        <Breadcrumbs trail={[{ href: '/library', label: 'Library' }]} current={`${title} · version ${v.version}`} />
        <h1 className="flex flex-wrap items-center gap-2 break-words">
          Factor correlations · {v.segments.length} segments · version {v.version} <StatusBadge status={v.status} />
        </h1>
        <p className="mt-1 text-sm text-[var(--color-muted)]">
          {v.segments.join(', ')}; effective {v.effectiveDate}, review by {v.reviewBy}; window {v.windowFrom} to {v.windowTo}.
        </p>
        <PublicationLine note={page.publication} />
      </div>
      <VersionCautions cautions={[...matrixCautions]} />

      <section className="panel space-y-3 p-5" aria-labelledby="value-heading">
        <h2 id="value-heading">The matrix to use</h2>
        <p className="text-sm">
          {v.nearest
            ? `The pairwise estimates are not positive semi-definite (smallest eigenvalue ${v.smallestEigenvalue.toFixed(4)}): the value starts from their nearest correlation matrix (Higham 2002)${v.largestChange ? `, which moves ${v.largestChange.a}–${v.largestChange.b} most, from ${v.largestChange.from.toFixed(3)} to ${v.largestChange.to.toFixed(3)}` : ''}.`
            : `The pairwise estimates form a valid correlation matrix (smallest eigenvalue ${v.smallestEigenvalue.toFixed(4)}).`}{' '}
          {v.margin > 0 ? `A margin of ${v.margin} is added to every off-diagonal entry.` : 'No margin is added.'} The value is a valid correlation matrix: unit
          diagonal, entries between -1 and 1, smallest eigenvalue <span className="num">{v.valueSmallestEigenvalue.toFixed(4)}</span>.
        </p>
        <div className="flex flex-wrap gap-6 overflow-x-auto" data-testid="matrix-value">
          <Heatmap title="Value to use" segments={v.segments} matrix={v.value} testId="matrix-value-heatmap" />
          <Heatmap title="Pairwise estimates" segments={v.segments} matrix={v.estimated} testId="matrix-estimated-heatmap" />
          {v.nearest ? <Heatmap title="Nearest correlation matrix" segments={v.segments} matrix={v.nearest} testId="matrix-nearest-heatmap" /> : null}
        </div>
        <ScrollBox label="Pairs">
          <table className="table text-sm" aria-label="Pairs">
            <thead>
              <tr>
                <th scope="col">pair</th>
                <th scope="col">r</th>
                <th scope="col">profile interval</th>
                <th scope="col">moment version</th>
                <th scope="col">common window</th>
                <th scope="col">value used</th>
              </tr>
            </thead>
            <tbody>
              {v.pairs.map((p) => (
                <tr key={`${p.a}|${p.b}`}>
                  <th scope="row">
                    {p.a} – {p.b}
                  </th>
                  <td className="num">{r4(p.r)}</td>
                  <td className="num">
                    {interval(p.lower, p.upper)} {level(p.level)}
                  </td>
                  <td className="num">{r4(p.moment)}</td>
                  <td className="num">
                    {p.periods[0]} to {p.periods[p.periods.length - 1]} ({p.periods.length} years)
                  </td>
                  <td className="num font-semibold">{r4(v.value[idx.get(p.a)!][idx.get(p.b)!])}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </ScrollBox>
      </section>

      <section className="grid gap-4 lg:grid-cols-3">
        <div className="panel p-5 lg:col-span-2">
          <h2 className="mb-2">Lineage and judgement</h2>
          <dl className="grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[12rem_minmax(0,1fr)]" data-testid="matrix-lineage">
            <dt>Fit run</dt>
            <dd>{v.fitRunId ? <Link href={`/fits/${v.fitRunId}`}>fit {v.fitRunId}</Link> : '—'}</dd>
            <dt>Dataset</dt>
            <dd>
              {v.datasetId ? <Link href={`/data/${v.datasetId}`}>dataset {v.datasetId}</Link> : '—'}{' '}
              <span className="num text-xs break-all">SHA-256 {v.datasetSha256}</span>
            </dd>
            <dt>Engine version</dt>
            <dd className="num">{v.engineVersion}</dd>
            <dt>Seeds</dt>
            <dd>{seedsText(v.seeds)}</dd>
            <dt>Content hash</dt>
            <dd className="num text-xs break-all">{v.contentHash}</dd>
            <dt>Margin</dt>
            <dd>
              <span className="num">{rho(v.margin)}</span> off the diagonal: <span className="whitespace-pre-wrap">{v.marginRationale}</span>
            </dd>
            <dt>Intended uses</dt>
            <dd className="whitespace-pre-wrap">{v.intendedUses}</dd>
            <dt>Limitations</dt>
            <dd className="whitespace-pre-wrap">{v.limitations}</dd>
            <dt>Author</dt>
            <dd>
              {v.author?.name ?? '—'} <span className="text-[var(--color-muted)]">drafted {when(v.createdAt)}</span>
            </dd>
            <dt>Validator</dt>
            <dd>{v.validator ? `${v.validator.name}, decided ${when(v.decidedAt)}` : 'not decided yet'}</dd>
            <dt>{v.status === 'draft' && v.decisionComment ? 'Changes requested' : 'Decision comment'}</dt>
            <dd className="whitespace-pre-wrap">{v.decisionComment ?? '—'}</dd>
            <dt>Published</dt>
            <dd>{when(v.publishedAt)}</dd>
            {v.endedAt ? (
              <>
                <dt>{label(v.status)}</dt>
                <dd>{when(v.endedAt)}</dd>
              </>
            ) : null}
          </dl>
        </div>
        <div className="panel space-y-3 p-5">
          <h2>Your action</h2>
          {actor.role !== 'viewer' ? (
            <TransitionPanel
              versionId={v.id}
              endpoint={`/api/factor-matrices/${v.id}/transitions`}
              actions={page.actions}
              facts={{
                kind: 'matrix',
                segment: `the matrix of ${v.segments.join(', ')}`,
                version: v.version,
                lines: [
                  ['Segments', v.segments.join(', ')],
                  ['Starts from', v.nearest ? 'the nearest correlation matrix (the estimates are not PSD)' : 'the pairwise estimates'],
                  ['Margin', `${v.margin} off the diagonal`],
                  ['Smallest eigenvalue', v.valueSmallestEigenvalue.toFixed(4)],
                ],
                effectiveDate: v.effectiveDate,
                publishes: page.publication?.text ?? null,
                cautions: matrixCautions,
                findings: [],
              }}
            />
          ) : (
            <p className="text-sm">Viewers read published versions.</p>
          )}
          {actor.role === 'validator' && page.makerIds.includes(actor.id) ? (
            <p className="notice-caution text-sm">You drafted this version: another validator must review it.</p>
          ) : null}
          {can(actor.role, 'assumptions:draft') && editableStatuses.includes(v.status) ? (
            <MatrixDraftForm
              fitId={v.fitRunId}
              today={todayIso()}
              complete
              psd={v.nearest === null}
              edit={{
                versionId: v.id,
                initial: { margin: v.margin, marginRationale: v.marginRationale, intendedUses: v.intendedUses, limitations: v.limitations, effectiveDate: v.effectiveDate, reviewBy: v.reviewBy },
              }}
            />
          ) : null}
          <p className="text-sm text-[var(--color-muted)]">The evidence of a version is frozen: to use another fit, draft a new version from it.</p>
        </div>
      </section>

      <section className="panel p-5">
        <h2 className="mb-2">Versions</h2>
        <ScrollBox label="Versions">
          <table className="table" aria-label="Versions">
            <thead>
              <tr>
                <th>Version</th>
                <th>State</th>
                <th>Margin</th>
                <th>Effective</th>
                <th>Review by</th>
                <th>Author</th>
              </tr>
            </thead>
            <tbody>
              {page.versions.map((o) => (
                <tr key={o.id} aria-current={o.id === v.id ? 'true' : undefined}>
                  <td>{o.id === v.id ? `v${o.version} (this)` : <Link href={`/library/matrices/${o.id}`}>v{o.version}</Link>}</td>
                  <td>
                    <StatusBadge status={o.status} />
                  </td>
                  <td className="num">{o.margin}</td>
                  <td className="num">{o.effectiveDate}</td>
                  <td className="num">{o.reviewBy}</td>
                  <td>{o.author?.name ?? '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </ScrollBox>
      </section>

      <section className="panel p-5">
        <div className="mb-2 flex items-center gap-3">
          <h2>Audit trail</h2>
          <span className="text-xs text-[var(--color-muted)]">Append-only: the database refuses changes to these rows.</span>
        </div>
        <AuditTable audit={page.audit} />
      </section>
    </div>
  );
}
