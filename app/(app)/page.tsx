import type { Metadata } from 'next';
import Link from 'next/link';
import { roleDescriptions, roleLabels } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { getHealth } from '@/lib/dal/health';
import type { Role } from '@/db/schema';

export const metadata: Metadata = { title: 'Overview' };

type NextStep = { text: string; href?: string };

function nextSteps(role: Role): NextStep[] {
  switch (role) {
    case 'analyst':
      return [
        { text: 'Upload cohort default counts, vintage curves or a loan-level tape for a segment.' },
        { text: 'Fit the asset correlation of each segment by maximum likelihood and by moments, with intervals.' },
        { text: 'Draft an assumption with its margin of conservatism and submit it for review.' },
      ];
    case 'validator':
      return [
        { text: 'Review submitted assumptions: intervals, diagnostics, backtest and the estimator audit.' },
        { text: 'Run your own fits to challenge a draft; request changes, reject or approve.' },
        { text: 'You cannot approve a version you drafted or edited: the system refuses it.' },
      ];
    case 'admin':
      return [
        { text: 'Manage users and their roles.', href: '/admin' },
        { text: 'Create API tokens for downstream models that read published assumptions.' },
        { text: 'Administrators cannot approve assumptions.' },
      ];
    default:
      return [
        { text: 'Read published correlation assumptions with their interval, PD and cautions.' },
        { text: 'See what a correlation means for two obligors: joint default probability and default correlation.' },
      ];
  }
}

export default async function OverviewPage() {
  const user = await requireUser();
  const health = await getHealth();
  const steps = nextSteps(user.role);
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
