import type { Metadata } from 'next';
import Link from 'next/link';
import { roleDescriptions, roleLabels } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { getHealth } from '@/lib/dal/health';
import { listLibrary, listQueue } from '@/lib/dal/assumptions';
import { listMatrixQueue } from '@/lib/dal/factor-matrices';
import { listFindings } from '@/lib/dal/findings';
import { FindingsOverview } from '@/components/findings/findings-overview';
import { AgedEvidenceOverview } from '@/components/assumptions/aged-evidence-overview';
import type { Role } from '@/db/schema';

export const metadata: Metadata = { title: 'Overview' };

type NextStep = { text: string; href?: string };

function nextSteps(role: Role): NextStep[] {
  switch (role) {
    case 'analyst':
      return [
        { text: 'Upload cohort default counts, vintage curves or a loan-level tape for a segment.', href: '/data/upload' },
        { text: 'Fit the asset correlation of each segment by maximum likelihood and by moments, with intervals.', href: '/fits/new' },
        { text: 'Draft an assumption with its margin of conservatism and submit it for review.', href: '/library/new' },
      ];
    case 'validator':
      return [
        { text: 'Review submitted assumptions: intervals, diagnostics, backtest and the small-sample simulation study.', href: '/queue' },
        { text: 'Run your own fits to challenge a draft; request changes, reject or approve.', href: '/fits/new' },
        { text: 'You cannot approve a version you drafted or edited: the system refuses it.' },
      ];
    case 'admin':
      return [
        { text: 'Manage users and their roles.', href: '/admin' },
        { text: 'Create API tokens for downstream models that read published assumptions.', href: '/admin/tokens' },
        { text: 'Administrators cannot approve assumptions.' },
      ];
    default:
      return [
        { text: 'Read published correlation assumptions with their interval, PD and cautions.', href: '/library' },
        { text: 'See what a correlation means for two obligors: joint default probability and default correlation.', href: '/pairs' },
      ];
  }
}

export default async function OverviewPage() {
  const user = await requireUser();
  const [health, queue, library, unresolved] = await Promise.all([getHealth(), listQueue(user).then(async (q) => [...q, ...(await listMatrixQueue(user))]), listLibrary(user), listFindings(user, { unresolved: true })]);
  const steps = nextSteps(user.role);
  const expiring = library.filter((e) => e.health === 'expiring');
  const expired = library.filter((e) => e.health === 'expired' || e.health === 'overdue');
  const published = library.filter((e) => e.current?.status === 'published');
  return (
    <div className="space-y-6">
      <section>
        <h1>Overview</h1>
        <p className="mt-2 max-w-3xl text-[var(--color-muted)]">
          Rhobook estimates the asset correlation of each portfolio segment under the Vasicek one-factor model from
          your own default history, shows how certain each estimate is, and turns a reviewed estimate into an approved,
          versioned assumption that capital, stress-test, provisioning and securitisation models read through an API.
        </p>
      </section>

      <div className="grid gap-4 md:grid-cols-2">
      {user.role === 'analyst' || user.role === 'validator' ? (
        <section className="panel p-5" aria-label="Needs your action">
          <div className="flex items-baseline justify-between">
            <h2>Needs your action</h2>
            <Link href="/queue" className="text-sm">
              Open the queue
            </Link>
          </div>
          {queue.length === 0 ? (
            <p className="mt-2 text-sm text-[var(--color-muted)]">Nothing awaits you.</p>
          ) : (
            <ul className="mt-2 space-y-1">
              {queue.slice(0, 6).map((q) => (
                <li key={q.href} className="flex flex-wrap gap-x-3">
                  <Link href={q.href}>
                    {q.segment} v{q.version}
                  </Link>
                  <span className="text-sm text-[var(--color-muted)]">{q.why}</span>
                </li>
              ))}
              {queue.length > 6 ? <li className="text-sm text-[var(--color-muted)]">and {queue.length - 6} more</li> : null}
            </ul>
          )}
        </section>
      ) : null}

      <section className={`panel p-5 ${user.role === 'analyst' || user.role === 'validator' ? '' : 'md:col-span-2'}`} aria-label="Library health">
        <div className="flex items-baseline justify-between">
          <h2>Library health</h2>
          <Link href="/library" className="text-sm">
            Open the library
          </Link>
        </div>
        <p className="mt-2 text-sm">
          {published.length === 0 ? 'No published assumption is in force yet' : <><span className="num">{published.length}</span> published assumption{published.length === 1 ? '' : 's'} in force</>}
          {expiring.length ? (
            <>
              {' · '}
              <span className="font-medium text-[var(--color-caution)]">{expiring.length} due for review within 30 days</span>
            </>
          ) : null}
          {expired.length ? (
            <>
              {' · '}
              <span className="font-medium text-[var(--color-bad)]">
                {expired.length} past review-by
                {expired.some((e) => e.health === 'overdue') ? ` (${expired.filter((e) => e.health === 'overdue').length} still served, flagged overdue)` : ''}
              </span>
            </>
          ) : null}
        </p>
        {[...expired, ...expiring].length ? (
          <ul className="mt-2 space-y-1 text-sm">
            {[...expired, ...expiring].slice(0, 6).map((e) => (
              <li key={e.assumptionId}>
                {e.current ? <Link href={`/library/versions/${e.current.id}`}>{e.segment}</Link> : e.segment}
                <span className="ml-2 text-[var(--color-muted)]">
                  review by {e.current?.reviewBy ?? '—'}
                  {e.daysToReview !== null ? (e.daysToReview < 0 ? ` (${-e.daysToReview} days ago)` : ` (in ${e.daysToReview} days)`) : ''}
                </span>
              </li>
            ))}
          </ul>
        ) : null}
      </section>
      </div>

      <div className="grid gap-4 md:grid-cols-2">
        <FindingsOverview unresolved={unresolved} meId={user.id} />
        <AgedEvidenceOverview library={library} />
      </div>

      <section className="grid gap-4 md:grid-cols-3">
        <div className="panel p-5 md:col-span-2">
          <h2>
            What you can do as {roleLabels[user.role].toLowerCase()}
          </h2>
          <p className="mt-1 text-sm text-[var(--color-muted)]">{roleDescriptions[user.role]}</p>
          <ul className="mt-3 list-disc space-y-1.5 pl-5">
            {steps.map((s) => (
              <li key={s.text}>{s.href ? <Link href={s.href}>{s.text}</Link> : s.text}</li>
            ))}
          </ul>
        </div>
        <div className="panel p-5">
          <h2>System</h2>
          <dl className="mt-2 space-y-1 text-sm">
            <div className="flex justify-between">
              <dt>Database</dt>
              <dd>{health.db === 'ok' ? 'answering' : 'not answering'}</dd>
            </div>
            <div className="flex justify-between">
              <dt>Worker</dt>
              <dd>
                {health.worker.lastHeartbeat
                  ? health.worker.stale
                    ? 'silent'
                    : 'running'
                  : 'not started'}
              </dd>
            </div>
          </dl>
          {health.worker.stale ? (
            <p className="notice-caution mt-3 text-sm">
              No worker has reported recently: fits and conversions will wait in the queue until one runs.
            </p>
          ) : null}
        </div>
      </section>

      <section className="notice-caution text-sm">
        <strong>Read estimates with care.</strong> The Gaussian one-factor model has no tail dependence and a single
        constant correlation; 10–25 annual observations give wide intervals and a downward bias; a correlation is valid
        only with the PD and the definition of default it was fitted on; supervisory correlations are policy settings,
        not estimates; approval in Rhobook is neither an independent validation nor a regulator&apos;s approval.
      </section>
    </div>
  );
}
