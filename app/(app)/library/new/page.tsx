import type { Metadata } from 'next';
import Link from 'next/link';
import { forbidden } from 'next/navigation';
import { z } from 'zod';
import { DraftForm, type FitOption } from '@/components/assumptions/draft-form';
import { todayIso } from '@/lib/assumptions/dates';
import { estimatorKeys } from '@/lib/assumptions/content';
import { CREDIBLE_INTERVAL, POSTERIOR_ESTIMATOR } from '@/lib/assumptions/posterior-evidence';
import { tCopulaCaution } from '@/lib/assumptions/t-copula-caution';
import { T_COPULA_ESTIMATOR, tCopulaRefusal } from '@/lib/assumptions/t-copula-evidence';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { listOpenVersions } from '@/lib/dal/assumptions';
import { getFit, listFits } from '@/lib/dal/fits';
import { AppError } from '@/lib/errors';

export const metadata: Metadata = { title: 'Draft an assumption' };

export default async function NewDraftPage({ searchParams }: { searchParams: Promise<{ fitId?: string; segment?: string }> }) {
  const actor = await requireUser();
  if (!can(actor.role, 'assumptions:draft')) forbidden();
  const sp = await searchParams;
  const recent = (await listFits(actor, { limit: 50 })).filter((f) => f.status === 'succeeded').slice(0, 12).map((f) => f.id);
  // The fit named in the link (from a fit review) is offered even when it is not among the recent ones.
  const asked = z.coerce.number().int().positive().safeParse(sp.fitId);
  const ids = asked.success && !recent.includes(asked.data) ? [asked.data, ...recent] : recent;
  const options: FitOption[] = [];
  for (const id of ids) {
    const full = await getFit(actor, id).catch((err) => {
      if (err instanceof AppError && err.kind === 'not_found') return null;
      throw err;
    });
    if (!full || full.status !== 'succeeded') continue;
    const f = full;
    for (const s of full.results?.segments ?? []) {
      const estimates: FitOption['estimates'] = {};
      for (const [k, e] of Object.entries(s.estimates)) {
        // The beta and logit-normal laws have no asset correlation of their own to draft; the t copula is offered below.
        if (!(estimatorKeys as readonly string[]).includes(k) || k === T_COPULA_ESTIMATOR) continue;
        const intervals: FitOption['estimates'][string]['intervals'] = {};
        const ivs = (e as { intervals?: Record<string, { level: number; lower: number; upper: number } | null> }).intervals ?? {};
        for (const [m, iv] of Object.entries(ivs)) if (iv) intervals[m] = { level: iv.level, lower: iv.lower, upper: iv.upper };
        estimates[k] = { rho: e.rho, pd: e.pd, intervals };
      }
      // A low-default segment's posterior median, with its credible interval and priors, when the fit computed it.
      if (s.posterior?.status === 'ok') {
        const p = s.posterior;
        estimates[POSTERIOR_ESTIMATOR] = { rho: p.median, pd: p.pd.median, intervals: { [CREDIBLE_INTERVAL]: { level: p.level, lower: p.lower, upper: p.upper } }, prior: p.prior };
      }
      // The Student-t copula's maximum, with nu and its interval, when the fit challenged the Gaussian copula; its sentence when it cannot be drafted.
      if (!s.estimates.tCopula) {
        estimates[T_COPULA_ESTIMATOR] = { rho: null, pd: null, intervals: {}, missing: true };
      } else {
        const t = s.estimates.tCopula;
        const refusal = tCopulaRefusal(s.segment, t);
        const iv = t.intervals.profile;
        estimates[T_COPULA_ESTIMATOR] =
          refusal === null && t.rho !== null && t.nu !== null && iv && t.nuInterval
            ? {
                rho: t.rho,
                pd: t.pd,
                intervals: { profile: { level: iv.level, lower: iv.lower as number, upper: iv.upper as number } },
                nu: { value: t.nu, interval: t.nuInterval, caution: tCopulaCaution(t.rho, t.nu) },
              }
            : { rho: null, pd: null, intervals: {}, refusal: refusal ?? undefined };
      }
      options.push({ fitId: f.id, segment: s.segment, label: `Fit ${f.id} · ${f.datasetName} · ${s.segment}`, estimates });
    }
  }
  const open = Object.fromEntries((await listOpenVersions(actor)).map((v) => [v.segment, { id: v.id, version: v.version, status: v.status }]));
  // A fit and segment from the link; a segment alone picks the newest fit that has it.
  const initial =
    options.find((o) => String(o.fitId) === sp.fitId && o.segment === sp.segment) ??
    (!sp.fitId && sp.segment ? options.find((o) => o.segment === sp.segment) : undefined);
  return (
    <div className="space-y-4">
      <p className="text-sm">
        <Link href="/library">Library</Link> / new draft
      </p>
      <h1>Draft an assumption</h1>
      <p className="max-w-3xl text-sm text-[var(--color-muted)]">
        The estimate, its interval and PD, the data window, the dataset hash, the engine version and the seeds are copied from the fit and
        frozen. Add the margins of conservatism, each with its rationale; a validator who did not draft or edit the version reviews it.
      </p>
      {options.length === 0 ? (
        <p className="notice-caution">
          No finished fit yet. <Link href="/fits">Run a fit</Link> first, then draft from it.
        </p>
      ) : (
        <section className="panel p-5">
          <DraftForm mode="create" options={options} initialFit={initial ? `${initial.fitId}|${initial.segment}` : undefined} today={todayIso()} open={open} />
        </section>
      )}
    </div>
  );
}
