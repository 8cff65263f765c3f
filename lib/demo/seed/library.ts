/**
 * Seeds the demo organisation's assumption library (after data.ts has stored the demo datasets),
 * through the same code and the same rules as a person would use, with the seed's own clock for
 * the past, so that the audit trail, the reviews, the publications and the mail outbox are real:
 *
 * 1. the demo analyst requests a fit of four segments of the cohort dataset (lib/dal/fits.ts
 *    createFit), and the fit job runs here in-process exactly as the worker runs it (the runner is
 *    handed in by the entry script, db/seed.ts);
 * 2. from that fit (lib/dal/assumptions) the analyst drafts four assumptions with margins and
 *    rationale (the final value: estimate plus margins rounded up to two decimals):
 *    - Prime auto loans: drafted and approved a year ago, published by the scheduler on its
 *      effective date almost a year ago, so it is due for review in 20 days;
 *    - SME term loans: the same loop four months ago (so as-of queries before and after it answer
 *      differently);
 *    - Owner-occupied mortgages: submitted three days ago, waiting in the validator's queue,
 *      effective on the first of next month;
 *    - Credit cards: reviewed and sent back with changes requested two days ago.
 *    and, from a second fit with the correlations between segments' factors, a factor-correlation
 *    matrix of the SME, auto and mortgage books, published by the scheduler two months ago;
 *
 * 3. the governance around them:
 *    - a consuming model, the economic capital model, registered by the analyst as using the auto
 *      and SME values, with a webhook to the app's own local receiver (/api/webhook-receiver), so
 *      that their publications reach it signed when the worker starts;
 *    - validation findings: a medium one open on the mortgages version under review, a high one
 *      on the credit-card draft (which blocks its approval until closed or accepted);
 *    - a restated cohort file that supersedes the first (data.ts seedRestatedCohorts): the auto and
 *      SME values are flagged, and their backtest on the new year runs here as the worker runs it.
 *
 * Effective dates are never before approval dates (the lifecycle refuses that); the datasets, the
 * fit and the model carry the time the seed ran. The messages these transitions write to the
 * outbox (and the webhook deliveries) are sent by the worker when it starts.
 */
import { addDays, addMonths, todayIso } from '@/lib/assumptions/dates';
import { conservativeValue, type Margins } from '@/lib/assumptions/margins';
import type { SessionUser } from '@/lib/auth/guard';
import { createDraft, runScheduledTransitions, transition } from '@/lib/dal/assumptions';
import { createMatrixDraft, matrixTransition } from '@/lib/dal/factor-matrices';
import { queuedBacktestJobs } from '@/lib/dal/evidence-store';
import { recordFinding } from '@/lib/dal/findings';
import { createFit, getFit } from '@/lib/dal/fits';
import { createModel, updateModel } from '@/lib/dal/models';
import { appUrl } from '@/lib/env';
import { FIT_JOB } from '@/lib/jobs/kinds/fit-payload';
import { MONITOR_BACKTEST_JOB } from '@/lib/jobs/kinds/monitor-backtest-payload';
import { seedRestatedCohorts } from './data';
import type { Db } from '@/db/connection';

/** Runs one queued job to completion in this process (workers/run-job-here.ts). */
export type RunJobHere = (db: Db, jobId: number, kind: string) => Promise<void>;

const SEGMENTS = ['SME term loans', 'Prime auto loans', 'Owner-occupied mortgages', 'Credit cards'] as const;
/** The segments of the demo's factor-correlation matrix (the end-to-end test drafts another set's). */
const MATRIX_SEGMENTS = ['SME term loans', 'Prime auto loans', 'Owner-occupied mortgages'] as const;

/** The first day of the month `months` months before `today`. */
function monthsBefore(today: string, months: number): string {
  return `${addMonths(today, -months).slice(0, 8)}01`;
}

/** Runs `work` with FIT_THREADS=0: the bootstrap and the pairs on this thread, as the seed starts no worker threads. */
async function withoutThreads(work: () => Promise<void>): Promise<void> {
  const threads = process.env.FIT_THREADS;
  process.env.FIT_THREADS = '0';
  try {
    await work();
  } finally {
    if (threads === undefined) delete process.env.FIT_THREADS;
    else process.env.FIT_THREADS = threads;
  }
}

/** A moment of the seed's past: the date at the given time of day (UTC). */
function at(date: string, time: string): Date {
  return new Date(`${date}T${time}:00.000Z`);
}

export async function seedDemoLibrary(
  db: Db,
  people: { analyst: SessionUser; validator: SessionUser },
  cohortDatasetId: number,
  runJob: RunJobHere,
  now: Date = new Date(),
): Promise<void> {
  const t0 = Date.now();
  const { analyst, validator } = people;
  const today = todayIso(now);

  const fit = await createFit(analyst, { datasetId: cohortDatasetId, segments: [...SEGMENTS], level: 0.95, bootstrap: { replications: 200, seed: 20260101 } });
  const { jobIds } = await getFit(analyst, fit.id);
  if (jobIds.length === 0) throw new Error(`The demo fit ${fit.id} has no job.`);
  // One job per segment, in order.
  await withoutThreads(async () => {
    for (const jobId of jobIds) await runJob(db, jobId, FIT_JOB);
  });

  // The analyst rounds the estimate plus margins up to two decimals, as a published figure would be.
  const fitted = await getFit(analyst, fit.id);
  const roundedUp = (segment: string, m: Margins) => {
    const results = fitted.results as { segments?: { segment: string; estimates?: { binomialMle?: { rho?: unknown } } }[] } | null;
    const rho = results?.segments?.find((s) => s.segment === segment)?.estimates?.binomialMle?.rho;
    if (typeof rho !== 'number') throw new Error(`The demo fit gave no binomialMle estimate for ${segment}.`);
    return Math.ceil(conservativeValue(rho, m) * 100 - 1e-9) / 100;
  };
  const periodsNote = 'annual cohorts of the demo cohort file';
  const nextMonth = `${addMonths(today, 1).slice(0, 8)}01`;

  // Prime auto loans: the full maker-checker loop a year ago; the scheduler publishes it on its
  // effective date, so its review-by date is 20 days away (the library shows it as due for review,
  // and the scheduler sends the 30-day reminder).
  const autoEffective = addDays(addMonths(today, -12), 20);
  const auto = await createDraft(
    analyst,
    {
      fitId: fit.id,
      segment: 'Prime auto loans',
      estimator: 'binomialMle',
      intervalMethod: 'profile',
      margins: {
        data: { value: 0.01, rationale: `The ${periodsNote} start in 2008; the vintage file has not been reconciled with them yet.` },
        practice: { value: 0, rationale: 'No change in lending or recovery practice over the window.' },
        general: { value: 0.02, rationale: 'Downward bias of the estimate at this number of years.' },
      },
      finalValue: roundedUp('Prime auto loans', { data: 0.01, practice: 0, general: 0.02 }),
      intendedUses: 'Economic capital of the auto book; pricing of new auto loans.',
      limitations: 'Valid only with the fitted PD and the 90-days-past-due definition of default.',
      effectiveDate: autoEffective,
    },
    at(addDays(autoEffective, -14), '09:10'),
  );
  // The economic capital model uses the auto value (and, below, the SME one): it hears of their
  // publications by e-mail and through its webhook to the app's local receiver.
  const model = await createModel(analyst, {
    name: 'Economic capital model',
    ownerName: 'Capital modelling team',
    contactEmail: 'capital-models@fenmoor.example',
    intendedUse: 'Economic capital of the retail and SME books; reads the value in force at each month end.',
    webhookUrl: appUrl('/api/webhook-receiver'),
    assumptionIds: [auto.assumptionId],
  });
  await transition(analyst, auto.id, { action: 'submit' }, at(addDays(autoEffective, -13), '10:05'));
  await transition(validator, auto.id, { action: 'start-review' }, at(addDays(autoEffective, -12), '09:30'));
  await transition(validator, auto.id, { action: 'approve', comment: 'Approved for economic capital and pricing.' }, at(addDays(autoEffective, -10), '14:20'));
  await runScheduledTransitions(at(autoEffective, '00:05'), db);

  // SME term loans: the same loop, published four months ago.
  const smeEffective = monthsBefore(today, 4);
  const sme = await createDraft(
    analyst,
    {
      fitId: fit.id,
      segment: 'SME term loans',
      estimator: 'binomialMle',
      intervalMethod: 'profile',
      margins: {
        data: { value: 0.01, rationale: `Only the ${periodsNote}; two years of the early window use a looser default definition (120 days past due).` },
        practice: { value: 0.005, rationale: 'Underwriting of SME term loans moved to a scorecard in 2019; too few cohorts since then to see its effect.' },
        general: {
          value: 0.02,
          rationale: 'The maximum-likelihood estimate is biased low at this number of years; the margin covers about half of the distance to the upper end of the profile interval.',
        },
      },
      finalValue: roundedUp('SME term loans', { data: 0.01, practice: 0.005, general: 0.02 }),
      intendedUses: 'Economic capital of the SME book and its ICAAP stress scenarios.',
      limitations:
        'Valid only with the fitted PD and the 90-days-past-due definition of default. Not for regulatory capital, where the supervisory correlation applies.',
      effectiveDate: smeEffective,
    },
    at(addDays(smeEffective, -12), '08:45'),
  );
  await updateModel(analyst, model.model.id, { assumptionIds: [auto.assumptionId, sme.assumptionId] });
  await transition(analyst, sme.id, { action: 'submit' }, at(addDays(smeEffective, -11), '16:30'));
  await transition(validator, sme.id, { action: 'start-review' }, at(addDays(smeEffective, -9), '09:15'));
  await transition(
    validator,
    sme.id,
    { action: 'approve', comment: 'Profile interval, margins and the comparison with the supervisory correlation checked; approved for economic capital.' },
    at(addDays(smeEffective, -6), '11:40'),
  );
  await runScheduledTransitions(at(smeEffective, '00:05'), db);

  // A factor-correlation matrix of the SME, auto and mortgage books: a second fit, with the
  // correlations between their factors, drafted as an assumption with a margin on every pair,
  // approved and published by the scheduler two months ago.
  const pairsFit = await createFit(analyst, { datasetId: cohortDatasetId, segments: [...MATRIX_SEGMENTS], level: 0.95, pairs: true });
  await withoutThreads(async () => {
    for (const jobId of (await getFit(analyst, pairsFit.id)).jobIds) await runJob(db, jobId, FIT_JOB);
  });
  const matrixEffective = monthsBefore(today, 2);
  const matrix = await createMatrixDraft(
    analyst,
    {
      fitId: pairsFit.id,
      margin: {
        value: 0.05,
        rationale: 'Each pair rests on the annual cohorts of the demo cohort file only; the profile intervals are wide, so every factor correlation is raised by 0.05 (less diversification).',
      },
      intendedUses: 'Economic capital across the SME, auto and mortgage books: the correlation between their systematic factors.',
      limitations: 'Valid only with the segments’ fitted PDs and asset correlations under the Gaussian one-factor model per segment.',
      effectiveDate: matrixEffective,
    },
    at(addDays(matrixEffective, -9), '10:30'),
  );
  await matrixTransition(analyst, matrix.id, { action: 'submit' }, at(addDays(matrixEffective, -8), '15:10'));
  await matrixTransition(validator, matrix.id, { action: 'start-review' }, at(addDays(matrixEffective, -6), '09:00'));
  await matrixTransition(
    validator,
    matrix.id,
    { action: 'approve', comment: 'Pairs, intervals and the margin checked against the fit; the matrix is positive semi-definite. Approved for economic capital.' },
    at(addDays(matrixEffective, -4), '16:45'),
  );
  await runScheduledTransitions(at(matrixEffective, '00:05'), db);

  // Owner-occupied mortgages: submitted, in the validator's queue.
  const mortgages = await createDraft(
    analyst,
    {
      fitId: fit.id,
      segment: 'Owner-occupied mortgages',
      estimator: 'binomialMle',
      intervalMethod: 'profile',
      margins: {
        data: { value: 0.01, rationale: `The ${periodsNote} include no full house-price downturn.` },
        practice: { value: 0, rationale: 'No change in lending or recovery practice over the window.' },
        general: { value: 0.02, rationale: 'Downward bias of the estimate at this number of years.' },
      },
      finalValue: roundedUp('Owner-occupied mortgages', { data: 0.01, practice: 0, general: 0.02 }),
      intendedUses: 'Stress testing of the mortgage book; IFRS 9 scenario conditioning.',
      limitations: 'Valid only with the fitted PD and the 90-days-past-due definition of default.',
      effectiveDate: nextMonth,
    },
    at(addDays(today, -3), '10:00'),
  );
  await transition(analyst, mortgages.id, { action: 'submit' }, at(addDays(today, -3), '11:20'));
  await recordFinding(
    validator,
    {
      targetType: 'version',
      targetId: mortgages.id,
      title: 'No house-price downturn in the window',
      description:
        'The fitted years include no full house-price downturn, so the interval says little about a stressed year. Justify the data margin against a downturn scenario, or extend the window with the 2008-2011 cohorts of the predecessor portfolio.',
      severity: 'medium',
      ownerId: analyst.id,
      dueDate: addDays(today, 14),
    },
    at(addDays(today, -1), '15:10'),
  );

  // Credit cards: sent back by the validator with changes requested.
  const cards = await createDraft(
    analyst,
    {
      fitId: fit.id,
      segment: 'Credit cards',
      estimator: 'binomialMle',
      intervalMethod: 'profile',
      margins: {
        data: { value: 0.005, rationale: 'Fifteen annual cohorts.' },
        practice: { value: 0, rationale: 'No change in lending practice.' },
        general: { value: 0, rationale: 'None.' },
      },
      finalValue: roundedUp('Credit cards', { data: 0.005, practice: 0, general: 0 }),
      intendedUses: 'Economic capital of the card book.',
      limitations: 'Valid only with the fitted PD and the 90-days-past-due definition of default.',
      effectiveDate: nextMonth,
    },
    at(addDays(today, -5), '15:00'),
  );
  await transition(analyst, cards.id, { action: 'submit' }, at(addDays(today, -5), '15:30'));
  await transition(validator, cards.id, { action: 'start-review' }, at(addDays(today, -2), '09:00'));
  await transition(
    validator,
    cards.id,
    {
      action: 'request-changes',
      comment: 'A general estimation-error margin of 0 is not justified at fifteen years: the estimate is biased low. Add a margin with its rationale.',
    },
    at(addDays(today, -2), '10:10'),
  );

  await recordFinding(
    validator,
    {
      targetType: 'version',
      targetId: cards.id,
      title: 'General estimation-error margin of 0 not justified',
      description: 'At fifteen annual cohorts the likelihood estimate is biased low (see the estimator audit); a margin of 0 for general estimation error is not acceptable. Add a margin with its rationale.',
      severity: 'high',
      ownerId: analyst.id,
      dueDate: addDays(today, 10),
    },
    at(addDays(today, -2), '10:15'),
  );

  // The cohort file is restated with a new year: the auto and SME values rest on superseded data.
  // The scheduler's sweep flags them and queues their backtests, which run here.
  await seedRestatedCohorts(db, analyst, cohortDatasetId);
  await runScheduledTransitions(now, db);
  for (const jobId of await queuedBacktestJobs(db)) await runJob(db, jobId, MONITOR_BACKTEST_JOB);

  console.log(`[seed] demo assumptions (fit ${fit.id}; four segments), a factor-correlation matrix (fit ${pairsFit.id}), a consuming model, findings and a restated dataset in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
}
