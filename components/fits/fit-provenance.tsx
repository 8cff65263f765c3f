import Link from 'next/link';
import type { FitDto } from '@/lib/dal/fits';
import { level, when } from '@/lib/format';
import { FIT_MODEL_LABELS, type FitModel } from '@/lib/stats/fit-models';
import type { MixingLawModel } from '@/lib/stats/mixing-laws-block';

/** The other mixing laws as the provenance line names them. */
const MIXING_LAW_SHORT: Readonly<Record<MixingLawModel, string>> = { t: 't copula', beta: 'beta', logitNormal: 'logit-normal' };

/** Where a fit's numbers come from: dataset and its hash, window, level, models, seeds, engine, who and when. */
export function FitProvenance({ fit }: { fit: Pick<FitDto, 'datasetId' | 'datasetName' | 'datasetSha256' | 'request' | 'engineVersion' | 'createdBy' | 'createdAt'> }) {
  const r = fit.request;
  // requests stored before the models were chosen ran the independent model alone
  const models = (r.models as FitModel[] | undefined) ?? ['independent'];
  return (
    <p className="mt-1 text-sm text-[var(--color-muted)]" data-testid="fit-provenance">
      Dataset <Link href={`/data/${fit.datasetId}`}>#{fit.datasetId} {fit.datasetName}</Link> · SHA-256{' '}
      <code className="text-xs">{fit.datasetSha256.slice(0, 12)}…</code> · window{' '}
      {r.from === undefined && r.to === undefined ? 'all periods' : `${r.from ?? 'first'}–${r.to ?? 'last'}`} · level {level(r.level)} · models{' '}
      {models.map((m) => FIT_MODEL_LABELS[m]).join(' and ')}
      {r.breakTest ? ` · break test B ${r.breakTest.replications}, seed ${r.breakTest.seed}` : ''} · bootstrap{' '}
      {r.bootstrap ? `B ${r.bootstrap.replications}, seed ${r.bootstrap.seed}` : 'none'} · simulation study{' '}
      {r.audit ? `R ${r.audit.replications}, seed ${r.audit.seed}` : 'none'}
      {r.mixingLaws
        ? ` · mixing laws ${r.mixingLaws.laws.map((l) => MIXING_LAW_SHORT[l]).join(', ')}: test B ${r.mixingLaws.replications}, power R ${r.mixingLaws.powerReplications}, seed ${r.mixingLaws.seed}`
        : ''}{' '}
      · engine {fit.engineVersion} · started by {fit.createdBy}{' '}
      {when(fit.createdAt)}
    </p>
  );
}

/** Said instead of a review when a run's results were stored in an older layout. */
export function OldResultsNotice({ fitId, engineVersion }: { fitId: number; engineVersion: string }) {
  return (
    <p className="notice-caution text-sm" data-testid="old-results">
      This run&apos;s results were stored in an older layout (engine {engineVersion}, before the review had all its current parts), so they
      are not drawn here; they are kept as stored and answered by GET /api/fits/{fitId}. Start a new fit on the same dataset to review it
      here.
    </p>
  );
}
