import type { Metadata } from 'next';
import Link from 'next/link';
import { z } from 'zod';
import { requireUser } from '@/lib/auth/session';
import { getFitsForCompare } from '@/lib/dal/fits';
import { Cautions } from '@/components/assumptions/cautions';
import { Breadcrumbs } from '@/components/layout/breadcrumbs';
import { ScrollBox } from '@/components/layout/scroll-box';
import { capitalCaution } from '@/lib/assumptions/cautions';
import { fixed, interval, level, pct, pd, rho } from '@/lib/format';
import { estimatorLabel } from '@/lib/stats/estimators/types';
import { ESTIMATOR_ORDER, isCurrentResults, type FitSegmentResult } from '@/lib/fits/results';

export const metadata: Metadata = { title: 'Compare fits' };

const querySchema = z.object({
  ids: z
    .union([z.string(), z.array(z.string())])
    .transform((v) => (Array.isArray(v) ? v : v.split(',')).map((s) => Number(s)))
    .pipe(z.array(z.number().int().positive()).min(2).max(8)),
  segment: z.string().max(120).optional(),
});

export default async function ComparePage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await requireUser();
  const q = querySchema.safeParse(await searchParams);
  if (!q.success) {
    return (
      <div className="space-y-3">
        <Breadcrumbs trail={[{ href: '/fits', label: 'Fits' }]} current="Compare fits" />
        <h1>Compare fits</h1>
        <p className="notice-bad text-sm">Tick between two and eight finished runs that share a segment on the <Link href="/fits">Fits</Link> screen to compare them.</p>
      </div>
    );
  }
  const fits = await getFitsForCompare(actor, q.data.ids);
  const unfinished = fits.filter((f) => !f.results);
  const outdated = fits.filter((f) => f.results && !isCurrentResults(f.results));
  const segmentSets = fits.map((f) => new Set(f.results?.segments.map((s) => s.segment) ?? []));
  const common = [...(segmentSets[0] ?? [])].filter((s) => segmentSets.every((set) => set.has(s)));
  const segment = q.data.segment && common.includes(q.data.segment) ? q.data.segment : common[0];
  if (unfinished.length > 0 || outdated.length > 0 || !segment) {
    return (
      <div className="space-y-3">
        <Breadcrumbs trail={[{ href: '/fits', label: 'Fits' }]} current="Compare fits" />
        <h1>Compare fits</h1>
        <p className="notice-bad text-sm">
          {unfinished.length > 0
            ? `Run${unfinished.length > 1 ? 's' : ''} ${unfinished.map((f) => `#${f.id}`).join(', ')} ${unfinished.length > 1 ? 'have' : 'has'} not finished.`
            : outdated.length > 0
              ? `Run${outdated.length > 1 ? 's' : ''} ${outdated.map((f) => `#${f.id}`).join(', ')} stored results in an older layout; fit again to compare.`
              : 'These runs have no segment in common: compare runs that share a segment (the Fits screen greys out the others).'}{' '}
          <Link href="/fits">Back to the fits</Link>
        </p>
      </div>
    );
  }
  const cols = fits.map((f) => ({ fit: f, seg: f.results!.segments.find((s) => s.segment === segment) as FitSegmentResult }));
  const row = (label: string, cell: (c: (typeof cols)[number]) => React.ReactNode) => (
    <tr key={label}>
      <th scope="row" className="text-left font-normal text-[var(--color-ink)]">
        {label}
      </th>
      {cols.map((c) => (
        <td key={c.fit.id} className="num text-right">
          {cell(c)}
        </td>
      ))}
    </tr>
  );
  return (
    <div className="space-y-4">
      <div>
        <Breadcrumbs trail={[{ href: '/fits', label: 'Fits' }]} current={`Compare fits: ${segment}`} />
        <h1>Compare fits: {segment}</h1>
        {common.length > 1 ? (
          <p className="mt-1 text-sm">
            Other segments in common:{' '}
            {common
              .filter((s) => s !== segment)
              .map((s) => (
                <Link key={s} className="mr-2" href={`/fits/compare?ids=${q.data.ids.join(',')}&segment=${encodeURIComponent(s)}`}>
                  {s}
                </Link>
              ))}
          </p>
        ) : null}
      </div>
      <ScrollBox label="Comparison of the runs (scrolls sideways)" className="panel p-4">
        <table className="table" data-testid="compare-table">
          <thead>
            <tr>
              <th />
              {cols.map((c) => (
                <th key={c.fit.id} className="text-right">
                  <Link href={`/fits/${c.fit.id}`}>Fit #{c.fit.id}</Link>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {row('Dataset', (c) => `#${c.fit.datasetId} (${c.fit.datasetSha256.slice(0, 8)}…)`)}
            {row('Window', (c) => `${c.seg.periods[0]}–${c.seg.periods[c.seg.periods.length - 1]} (T ${c.seg.T})`)}
            {row('Level', (c) => level(c.fit.request.level))}
            {row('Engine', (c) => c.fit.engineVersion)}
            {row('Seeds (bootstrap, simulation study)', (c) => `${c.fit.seeds.bootstrap ?? '—'}, ${c.fit.seeds.audit ?? '—'}`)}
            {ESTIMATOR_ORDER.filter((k) => cols.some((c) => c.seg.estimates[k] !== undefined)).map((k) =>
              row(`ρ ${estimatorLabel(k)}`, (c) => rho(c.seg.estimates[k]?.rho)),
            )}
            {row('PD (likelihood)', (c) => pd(c.seg.estimates.binomialMle.pd))}
            {row('Profile interval', (c) => interval(c.seg.estimates.binomialMle.intervals.profile?.lower, c.seg.estimates.binomialMle.intervals.profile?.upper))}
            {row('Wald interval', (c) => interval(c.seg.estimates.binomialMle.intervals.wald?.lower, c.seg.estimates.binomialMle.intervals.wald?.upper))}
            {row('Bootstrap interval', (c) =>
              c.seg.estimates.binomialMle.intervals.bootstrap
                ? `${interval(c.seg.estimates.binomialMle.intervals.bootstrap.lower, c.seg.estimates.binomialMle.intervals.bootstrap.upper)} B ${c.seg.estimates.binomialMle.intervals.bootstrap.replications}`
                : '—',
            )}
            {row('99.9% default-rate quantile', (c) => pd(c.seg.implications?.quantile999))}
            {row('Illustrative IRB capital K at the estimate', (c) =>
              c.seg.implications ? (
                <>
                  {pct(c.seg.implications.capital.atEstimate)}
                  <span className="block font-sans text-xs text-[var(--color-muted)]" data-testid="capital-convention">
                    LGD {pct(c.seg.implications.lgd, 2)}, {c.seg.implications.maturityYears === null ? 'no maturity adjustment' : `maturity ${c.seg.implications.maturityYears} years`}
                  </span>
                </>
              ) : (
                '—'
              ),
            )}
            {row('Periods above the fitted 99% quantile', (c) => (c.seg.diagnostics.exceedances === null ? '—' : String(c.seg.diagnostics.exceedances.above99)))}
            {row('Lag-1 autocorrelation of the implied factor', (c) => fixed(c.seg.diagnostics.lag1Autocorrelation, 2))}
            {row('Small-sample simulation study: RMSE of the likelihood estimate', (c) => rho(c.seg.estimatorAudit?.estimators.binomialMle.rmse ?? null))}
            <tr>
              <th scope="row" className="text-left font-normal text-[var(--color-ink)]">
                Warnings
              </th>
              {cols.map((c) => (
                <td key={c.fit.id} className="align-top text-sm" data-testid={`compare-warnings-${c.fit.id}`}>
                  {c.seg.warnings.length === 0 ? (
                    'none'
                  ) : (
                    <ul className="list-disc space-y-1 pl-4">
                      {c.seg.warnings.map((w) => (
                        <li key={w.code}>{w.message}</li>
                      ))}
                    </ul>
                  )}
                </td>
              ))}
            </tr>
          </tbody>
        </table>
      </ScrollBox>
      <p className="text-xs text-[var(--color-muted)]">
        Runs on different datasets or windows answer different questions: compare the hash and the window before the numbers.{' '}
        {cols[0].seg.implications ? capitalCaution(cols[0].seg.implications.lgd, cols[0].seg.implications.maturityYears) : ''}
      </p>
      <Cautions compact columns />
    </div>
  );
}
