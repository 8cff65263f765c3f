import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { z } from 'zod';
import { Cautions } from '@/components/assumptions/cautions';
import { PublicationLine } from '@/components/assumptions/publication-line';
import { EvidencePanel } from '@/components/assumptions/evidence-panel';
import { VersionCautions } from '@/components/assumptions/version-cautions';
import { FindingsSection } from '@/components/findings/findings-section';
import { ModelsUsing } from '@/components/models/models-using';
import { ReportLinks } from '@/components/reports/report-links';
import { AuditTable } from '@/components/assumptions/audit-table';
import { StatusBadge } from '@/components/assumptions/status-badge';
import { TransitionPanel } from '@/components/assumptions/transition-panel';
import { VersionEvidence } from '@/components/assumptions/version-evidence';
import { Breadcrumbs } from '@/components/layout/breadcrumbs';
import { ScrollBox } from '@/components/layout/scroll-box';
import { assumptionCautions } from '@/lib/assumptions/cautions';
import { intervalMethodLabel } from '@/lib/assumptions/content';
import { versionCautions } from '@/lib/assumptions/consumer';
import { describeSpans, type DefinitionSpan } from '@/lib/ingest/default-definition';
import { editableStatuses } from '@/lib/assumptions/lifecycle';
import { can, roleLabels } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { getVersionPage } from '@/lib/dal/assumptions';
import { getFitSegment } from '@/lib/dal/fits';
import { findingsPanel } from '@/lib/dal/findings';
import { modelsUsing } from '@/lib/dal/models';
import { lowDefaultThreshold } from '@/lib/env';
import { AppError } from '@/lib/errors';
import { interval, level, pd, rho, seedsText } from '@/lib/format';
import { priorText, valueSourceInSentence, valueSourceLabel } from '@/lib/assumptions/posterior-evidence';
import { nuIntervalText, nuText } from '@/lib/assumptions/t-copula-evidence';
import { FIT_MODEL_LABELS } from '@/lib/stats/fit-models';

export const metadata: Metadata = { title: 'Assumption' };

const roleName = (r: string | null) => (r ? (roleLabels[r as keyof typeof roleLabels] ?? r).toLowerCase() : 'an unknown role');
const when = (s: string | null) => (s ? `${s.replace('T', ' ').slice(0, 16)} UTC` : '—');

function show(v: unknown): string {
  if (v === null || v === undefined || v === '') return '—';
  return typeof v === 'object' ? JSON.stringify(v) : String(v);
}

/** A changed field's value in the diff. */
function cell(field: string, value: unknown): string {
  if (field === 'seeds') return seedsText(value);
  if (field === 'defaultDefinitions') return Array.isArray(value) ? (describeSpans(value as DefinitionSpan[]) ?? 'not stated') : '—';
  return show(value);
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
  const findings = await findingsPanel(actor, { type: 'version', id: v.id });
  const usedBy = await modelsUsing(actor, v.assumptionId);
  const canEdit = can(actor.role, 'assumptions:draft') && editableStatuses.includes(v.status);
  return (
    <div className="space-y-5">
      <div className="grid gap-4 lg:grid-cols-[minmax(0,1fr)_minmax(0,28rem)]">
        <div className="min-w-0">
          <Breadcrumbs trail={[{ href: '/library', label: 'Library' }]} current={`${v.segment} · version ${v.version}`} />
          <div className="flex flex-wrap items-start justify-between gap-2">
            <h1 className="flex flex-wrap items-center gap-2 break-words">
              {v.segment} · version {v.version} <StatusBadge status={v.status} />
            </h1>
            <ReportLinks page={`/library/versions/${v.id}/report`} pdf={`/api/assumptions/${v.id}/report.pdf`} />
          </div>
          <p className="mt-1 text-lg">
            Value{' '}
            <span className="num font-semibold" data-testid="final-value">
              {rho(v.finalValue)}
            </span>
            <span className="ml-3 text-sm text-[var(--color-muted)]">
              with PD <span className="num">{pd(v.pd)}</span>; effective {v.effectiveDate}, review by {v.reviewBy}
            </span>
          </p>
          <p className="mt-1 text-sm text-[var(--color-muted)]">
            Estimate <span className="num">{rho(v.estimate)}</span> by {valueSourceInSentence(v.estimator)}, {level(v.intervalLevel)}{' '}
            {intervalMethodLabel(v.intervalMethod)} interval <span className="num">{interval(v.intervalLower, v.intervalUpper)}</span>; the
            value is valid only with this PD, the definition of default of the data and its mixing law (
            <span data-testid="mixing-law-line">{v.mixingLaw === 't' ? `Student-t copula, nu ${nuText(v.nu)}` : 'Gaussian copula'}</span>).
          </p>
          <PublicationLine note={page.publication} />
        </div>
        <Cautions compact title="Read this value with care." />
      </div>
      <VersionCautions cautions={versionCautions({ ...v, evidence: page.evidence, review: page.review })} />
      <EvidencePanel evidence={page.evidence} />

      <section className="grid gap-4 lg:grid-cols-3">
        <div className="panel p-5 lg:col-span-2">
          <h2 className="mb-2">Evidence and judgement</h2>
          <dl className="grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[12rem_minmax(0,1fr)]">
            <dt>Estimator</dt>
            <dd>
              {valueSourceLabel(v.estimator)}: <span className="num">{rho(v.estimate)}</span>
            </dd>
            <dt>Interval</dt>
            <dd>
              <span className="num">{interval(v.intervalLower, v.intervalUpper)}</span> {intervalMethodLabel(v.intervalMethod)}, {level(v.intervalLevel)}
            </dd>
            <dt>Model</dt>
            <dd data-testid="factor-model">
              {v.mixingLaw === 't' ? 'Student-t' : 'Gaussian'} one-factor, {FIT_MODEL_LABELS[v.factorModel]}
            </dd>
            <dt>Mixing law</dt>
            <dd data-testid="mixing-law">
              {v.mixingLaw === 't' ? (
                <>
                  Student-t copula (<span className="num">t</span>) with nu <span className="num">{nuText(v.nu)}</span>
                  {v.nuInterval ? (
                    <>
                      , profile interval of nu <span className="num">{nuIntervalText(v.nuInterval)}</span>
                    </>
                  ) : null}
                  : use the value with the t copula and this nu, not in the Gaussian (Vasicek) formula (the caution above says what nu means for the tail).
                </>
              ) : (
                <>
                  Gaussian copula (<span className="num">gaussian</span>): the Vasicek one-factor model.
                </>
              )}
            </dd>
            {v.prior ? (
              <>
                <dt>Prior</dt>
                <dd data-testid="version-prior">
                  {priorText(v.prior)}: the value is the posterior median under this prior, which shapes it as well as the data do (more so the
                  fewer the defaults); the PD is the posterior median of p.
                </dd>
              </>
            ) : null}
            <dt>Data window</dt>
            <dd>
              {v.windowFrom} to {v.windowTo}
            </dd>
            <dt>Definition of default</dt>
            <dd data-testid="version-default-definition">{v.defaultDefinitions ? (describeSpans(v.defaultDefinitions) ?? 'not stated in the data') : 'not recorded (drafted before it was carried)'}</dd>
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
          <ScrollBox label="Margins of conservatism">
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
                <td className="num text-right">{rho(v.marginData)}</td>
                <td className="whitespace-pre-wrap">{v.marginDataRationale}</td>
              </tr>
              <tr>
                <td>Changes in lending or recovery practice</td>
                <td className="num text-right">{rho(v.marginPractice)}</td>
                <td className="whitespace-pre-wrap">{v.marginPracticeRationale}</td>
              </tr>
              <tr>
                <td>General estimation error</td>
                <td className="num text-right">{rho(v.marginGeneral)}</td>
                <td className="whitespace-pre-wrap">{v.marginGeneralRationale}</td>
              </tr>
              <tr>
                <td>Estimate plus margins</td>
                <td className="num text-right">{rho(v.conservativeValue)}</td>
                <td>Final value {rho(v.finalValue)}</td>
              </tr>
            </tbody>
          </table>
          </ScrollBox>
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
          <dl className="grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[12rem_minmax(0,1fr)]" data-testid="people-and-dates">
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
          {actor.role !== 'viewer' ? <TransitionPanel
              versionId={v.id}
              actions={page.actions}
              facts={{
                segment: v.segment,
                version: v.version,
                value: v.finalValue,
                pd: v.pd,
                interval: { lower: v.intervalLower, upper: v.intervalUpper, method: v.intervalMethod, level: v.intervalLevel },
                mixingLaw: v.mixingLaw === 't' ? `Student-t copula, nu ${nuText(v.nu)}: use it with the t copula, not the Gaussian formula` : 'Gaussian copula',
                effectiveDate: v.effectiveDate,
                publishes: page.publication?.text ?? null,
                cautions: assumptionCautions,
                findings: findings.findings
                  .filter((f) => f.unresolved && f.severity !== 'high')
                  .map((f) => ({ id: f.id, title: f.title, severity: f.severity, status: f.statusLabel, dueDate: f.dueDate })),
              }}
            /> : <p className="text-sm">Viewers read published versions.</p>}
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
      <FindingsSection {...findings} note="Findings on this version, on its fit and on its dataset." />
      <ModelsUsing models={usedBy} />

      {page.changesFromPrevious && page.comparedWith ? (
        <section className="panel p-5" aria-labelledby="diff-heading">
          <div className="mb-2 flex flex-wrap items-center gap-3">
            <h2 id="diff-heading">
              Changes from version {page.comparedWith.version} to version {v.version}
            </h2>
            <span className="text-xs text-[var(--color-muted)]">Compare with another version: the “diff” links under Versions.</span>
          </div>
          {page.changesFromPrevious.length ? (
            <ScrollBox label="Changes between versions">
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
                      <td className="whitespace-pre-wrap text-[var(--color-bad)]">{cell(c.field, c.before)}</td>
                      <td className="whitespace-pre-wrap text-[var(--color-good)]">{cell(c.field, c.after)}</td>
                    </tr>
                  ))}
              </tbody>
            </table>
            </ScrollBox>
          ) : (
            <p className="text-sm">No content differs between the two versions.</p>
          )}
        </section>
      ) : null}

      <section className="panel p-5">
        <h2 className="mb-2">Versions</h2>
        <ScrollBox label="Versions">
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
                <td className="num text-right">{rho(o.finalValue)}</td>
                <td className="num">{o.effectiveDate}</td>
                <td className="num">{o.reviewBy}</td>
                <td>{o.author?.name ?? '—'}</td>
              </tr>
            ))}
          </tbody>
        </table>
        </ScrollBox>
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
        <AuditTable audit={page.audit} />
      </section>
    </div>
  );
}
