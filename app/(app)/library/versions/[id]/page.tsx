import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { z } from 'zod';
import { Cautions } from '@/components/assumptions/cautions';
import { fmt, StatusBadge } from '@/components/assumptions/status-badge';
import { TransitionPanel } from '@/components/assumptions/transition-panel';
import { VersionEvidence } from '@/components/assumptions/version-evidence';
import { editableStatuses, statusLabels } from '@/lib/assumptions/lifecycle';
import { can, roleLabels } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { getVersionPage } from '@/lib/dal/assumptions';
import { getFitSegment } from '@/lib/dal/fits';
import { lowDefaultThreshold } from '@/lib/env';
import { AppError } from '@/lib/errors';

export const metadata: Metadata = { title: 'Assumption' };

/** The fit's seeds ({ bootstrap, audit }) in words; anything else as JSON. */
function seedsText(seeds: unknown): string {
  if (seeds && typeof seeds === 'object' && !Array.isArray(seeds)) {
    const o = seeds as Record<string, unknown>;
    const parts = Object.entries(o).map(([k, val]) => `${k} ${val === null || val === undefined ? 'not run' : String(val)}`);
    return parts.length ? parts.join('; ') : 'none';
  }
  return show(seeds);
}

const label = (s: string) => statusLabels[s as keyof typeof statusLabels] ?? s;
const roleName = (r: string | null) => (r ? (roleLabels[r as keyof typeof roleLabels] ?? r).toLowerCase() : 'an unknown role');
const when = (s: string | null) => (s ? `${s.replace('T', ' ').slice(0, 16)} UTC` : '—');

function show(v: unknown): string {
  if (v === null || v === undefined || v === '') return '—';
  return typeof v === 'object' ? JSON.stringify(v) : String(v);
}

export default async function VersionPage({
  params,
  searchParams,
}: {
  params: Promise<{ id: string }>;
  searchParams: Promise<{ compare?: string }>;
}) {
  const actor = await requireUser();
  const id = z.coerce.number().int().positive().safeParse((await params).id);
  if (!id.success) notFound();
  const compare = z.coerce.number().int().positive().safeParse((await searchParams).compare);
  const page = await getVersionPage(actor, id.data, new Date(), compare.success ? compare.data : undefined).catch((err) => {
    if (err instanceof AppError && err.kind === 'not_found') notFound();
    throw err;
  });
  const v = page.version;
  const evidence = v.fitRunId ? await getFitSegment(actor, v.fitRunId, v.segment) : null;
  const canEdit = can(actor.role, 'assumptions:draft') && editableStatuses.includes(v.status);
  return (
    <div className="space-y-5">
      <div>
        <p className="text-sm">
          <Link href="/library">Library</Link> / {v.segment}
        </p>
        <h1 className="flex flex-wrap items-center gap-2">
          {v.segment} · version {v.version} <StatusBadge status={v.status} />
        </h1>
        <p className="mt-1 text-lg">
          Value <span className="num font-semibold" data-testid="final-value">{fmt(v.finalValue, 6)}</span>
          <span className="ml-3 text-sm text-[var(--color-muted)]">
            with PD <span className="num">{fmt(v.pd, 6)}</span>; effective {v.effectiveDate}, review by {v.reviewBy}
          </span>
        </p>
      </div>

      <section className="grid gap-4 lg:grid-cols-3">
        <div className="panel p-5 lg:col-span-2">
          <h2 className="mb-2">Evidence and judgement</h2>
          <dl className="grid grid-cols-[12rem_1fr] gap-x-4 gap-y-1 text-sm">
            <dt>Estimator</dt>
            <dd>
              {v.estimator}: <span className="num">{fmt(v.estimate, 6)}</span>
            </dd>
            <dt>Interval</dt>
            <dd className="num">
              [{fmt(v.intervalLower, 6)}, {fmt(v.intervalUpper, 6)}] {v.intervalMethod}, {fmt(v.intervalLevel * 100, 2)}%
            </dd>
            <dt>Data window</dt>
            <dd>
              {v.windowFrom} to {v.windowTo}
            </dd>
            <dt>Fit run</dt>
            <dd>{v.lineage.fitUrl ? <Link href={v.lineage.fitUrl}>fit {v.fitRunId}</Link> : '—'}</dd>
            <dt>Dataset</dt>
            <dd>
              {v.lineage.datasetUrl ? <Link href={v.lineage.datasetUrl}>dataset {v.datasetId}</Link> : '—'}{' '}
              <span className="num text-xs break-all">SHA-256 {v.datasetSha256}</span>
            </dd>
            <dt>Engine version</dt>
            <dd className="num">{v.engineVersion}</dd>
            <dt>Seeds</dt>
            <dd className="num" data-testid="seeds">
              {seedsText(v.seeds)}
            </dd>
            <dt>Content hash</dt>
            <dd className="num text-xs break-all">{v.contentHash}</dd>
          </dl>
          <h3 className="mt-4 mb-1">Margins of conservatism</h3>
          <table className="table">
            <thead>
              <tr>
                <th>Part</th>
                <th className="text-right">Margin</th>
                <th>Rationale</th>
              </tr>
            </thead>
            <tbody>
              <tr>
                <td>Data and method deficiencies</td>
                <td className="num text-right">{fmt(v.marginData, 6)}</td>
                <td className="whitespace-pre-wrap">{v.marginDataRationale}</td>
              </tr>
              <tr>
                <td>Changes in lending or recovery practice</td>
                <td className="num text-right">{fmt(v.marginPractice, 6)}</td>
                <td className="whitespace-pre-wrap">{v.marginPracticeRationale}</td>
              </tr>
              <tr>
                <td>General estimation error</td>
                <td className="num text-right">{fmt(v.marginGeneral, 6)}</td>
                <td className="whitespace-pre-wrap">{v.marginGeneralRationale}</td>
              </tr>
              <tr>
                <td>Estimate plus margins</td>
                <td className="num text-right">{fmt(v.conservativeValue, 6)}</td>
                <td>Final value {fmt(v.finalValue, 6)}</td>
              </tr>
            </tbody>
          </table>
          <div className="mt-3 grid gap-3 md:grid-cols-2 text-sm">
            <div>
              <h3>Intended uses</h3>
              <p className="whitespace-pre-wrap">{v.intendedUses}</p>
            </div>
            <div>
              <h3>Limitations</h3>
              <p className="whitespace-pre-wrap">{v.limitations}</p>
            </div>
          </div>
          <h3 className="mt-4 mb-1">People and dates</h3>
          <dl className="grid grid-cols-[12rem_1fr] gap-x-4 gap-y-1 text-sm" data-testid="people-and-dates">
            <dt>Author</dt>
            <dd>
              {v.author?.name ?? '—'} <span className="text-[var(--color-muted)]">drafted {when(v.createdAt)}</span>
            </dd>
            {v.lastEditedBy ? (
              <>
                <dt>Last edited by</dt>
                <dd>
                  {v.lastEditedBy.name} <span className="text-[var(--color-muted)]">{when(v.updatedAt)}</span>
                </dd>
              </>
            ) : null}
            <dt>Validator</dt>
            <dd>{v.validator ? `${v.validator.name}, decided ${when(v.decidedAt)}` : 'not decided yet'}</dd>
            <dt>{v.status === 'draft' && v.decisionComment ? 'Changes requested' : 'Decision comment'}</dt>
            <dd className="whitespace-pre-wrap">{v.decisionComment ?? '—'}</dd>
            <dt>Effective date</dt>
            <dd className="num">{v.effectiveDate}</dd>
            <dt>Review by</dt>
            <dd className="num">{v.reviewBy}</dd>
            <dt>Published</dt>
            <dd>{when(v.publishedAt)}</dd>
            {v.endedAt ? (
              <>
                <dt>{v.status === 'superseded' ? 'Superseded' : v.status === 'expired' ? 'Expired' : 'Retired'}</dt>
                <dd>{when(v.endedAt)}</dd>
              </>
            ) : null}
          </dl>
        </div>
        <div className="panel space-y-3 p-5">
          <h2>Your action</h2>
          {actor.role !== 'viewer' ? <TransitionPanel versionId={v.id} actions={page.actions} /> : <p className="text-sm">Viewers read published versions.</p>}
          {canEdit ? (
            <Link className="btn btn-quiet no-underline" href={`/library/versions/${v.id}/edit`}>
              Edit{v.status !== 'draft' ? ' (returns it to draft)' : ''}
            </Link>
          ) : null}
          {can(actor.role, 'assumptions:draft') && !page.versions.some((o) => editableStatuses.includes(o.status)) ? (
            <p className="text-sm">
              A published version is never changed: a correction is a new version.{' '}
              <Link href={`/library/new?segment=${encodeURIComponent(v.segment)}`}>Draft a new version</Link> from a finished fit.
            </p>
          ) : null}
          {actor.role === 'validator' && page.makerIds.includes(actor.id) ? (
            <p className="notice-caution text-sm">You drafted or edited this version: another validator must review it.</p>
          ) : null}
        </div>
      </section>

      <VersionEvidence evidence={evidence} segment={v.segment} lowDefaultThreshold={lowDefaultThreshold()} />

      {page.changesFromPrevious && page.comparedWith ? (
        <section className="panel p-5" aria-labelledby="diff-heading">
          <div className="mb-2 flex flex-wrap items-center gap-3">
            <h2 id="diff-heading">
              Changes from version {page.comparedWith.version} to version {v.version}
            </h2>
            <span className="text-xs text-[var(--color-muted)]">Compare with another version: the “diff” links under Versions.</span>
          </div>
          {page.changesFromPrevious.length ? (
            <table className="table" aria-label="Changes between versions">
              <thead>
                <tr>
                  <th>Field</th>
                  <th>Version {page.comparedWith.version}</th>
                  <th>Version {v.version}</th>
                </tr>
              </thead>
              <tbody>
                {page.changesFromPrevious
                  .filter((c) => c.field !== 'segment')
                  .map((c) => (
                    <tr key={c.field}>
                      <td>{c.label}</td>
                      <td className="whitespace-pre-wrap text-[var(--color-bad)]">{c.field === 'seeds' ? seedsText(c.before) : show(c.before)}</td>
                      <td className="whitespace-pre-wrap text-[var(--color-good)]">{c.field === 'seeds' ? seedsText(c.after) : show(c.after)}</td>
                    </tr>
                  ))}
              </tbody>
            </table>
          ) : (
            <p className="text-sm">No content differs between the two versions.</p>
          )}
        </section>
      ) : null}

      <section className="panel p-5">
        <h2 className="mb-2">Versions</h2>
        <table className="table" aria-label="Versions">
          <thead>
            <tr>
              <th>Version</th>
              <th>State</th>
              <th className="text-right">Value</th>
              <th>Effective</th>
              <th>Review by</th>
              <th>Author</th>
            </tr>
          </thead>
          <tbody>
            {page.versions.map((o) => (
              <tr key={o.id} aria-current={o.id === v.id ? 'true' : undefined}>
                <td>
                  {o.id === v.id ? (
                    `v${o.version} (this)`
                  ) : (
                    <>
                      <Link href={`/library/versions/${o.id}`}>v{o.version}</Link>{' '}
                      <Link className="text-xs" href={`/library/versions/${v.id}?compare=${o.id}`} aria-label={`Compare version ${v.version} with version ${o.version}`}>
                        diff
                      </Link>
                    </>
                  )}
                </td>
                <td>
                  <StatusBadge status={o.status} />
                </td>
                <td className="num text-right">{fmt(o.finalValue, 6)}</td>
                <td className="num">{o.effectiveDate}</td>
                <td className="num">{o.reviewBy}</td>
                <td>{o.author?.name ?? '—'}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>

      {page.reviews.length ? (
        <section className="panel p-5">
          <h2 className="mb-2">Reviews of this version</h2>
          <ul className="space-y-1 text-sm">
            {page.reviews.map((r) => (
              <li key={r.id} className={r.voided ? 'line-through text-[var(--color-muted)]' : ''}>
                {r.at.replace('T', ' ').slice(0, 16)} {r.reviewer?.name ?? '—'}: {r.action}
                {r.comment ? ` — “${r.comment}”` : ''}
                {r.voided ? ' (voided by a later edit)' : ''}
              </li>
            ))}
          </ul>
        </section>
      ) : null}

      <section className="panel p-5">
        <div className="mb-2 flex items-center gap-3">
          <h2>Audit trail</h2>
          <a className="text-sm" href={`/api/assumptions/${v.id}/audit`} download>
            Export CSV
          </a>
          <span className="text-xs text-[var(--color-muted)]">Append-only: the database refuses changes to these rows.</span>
        </div>
        {page.roleChanges.length ? (
          <div className="notice-caution mb-3 text-sm" data-testid="role-changes">
            <p className="font-medium">
              {page.roleChanges.some((c) => c.approver)
                ? 'The role of the person who approved this version changed during its review.'
                : 'The role of a reviewer of this version changed during its review.'}
            </p>
            <ul className="mt-1 list-disc pl-5">
              {page.roleChanges.map((c, i) => (
                <li key={i}>
                  {when(c.at)}: {c.person?.name ?? 'a former user'}
                  {c.approver ? ' (the approver)' : ''} changed from {roleName(c.from)} to {roleName(c.to)} by {c.by}, from the administration log.
                </li>
              ))}
            </ul>
          </div>
        ) : null}
        <div className="overflow-x-auto">
          <table className="table" aria-label="Audit trail">
            <thead>
              <tr>
                <th>When (UTC)</th>
                <th>Version</th>
                <th>Action</th>
                <th>Who</th>
                <th>From → to</th>
                <th>Comment</th>
                <th>Content hash</th>
              </tr>
            </thead>
            <tbody>
              {page.audit.map((a) => (
                <tr key={a.id}>
                  <td className="num whitespace-nowrap">{a.at.replace('T', ' ').slice(0, 19)}</td>
                  <td>v{a.version}</td>
                  <td>{a.action}</td>
                  <td>
                    {a.actorEmail} <span className="badge">{a.actorRole}</span>
                  </td>
                  <td>
                    {a.fromStatus ? label(a.fromStatus) : '—'} → {label(a.toStatus)}
                  </td>
                  <td className="whitespace-pre-wrap">{a.comment ?? ''}</td>
                  <td className="num text-xs" title={a.contentHash}>
                    {a.contentHash.slice(0, 12)}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>
      <Cautions />
    </div>
  );
}
