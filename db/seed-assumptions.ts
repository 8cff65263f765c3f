/**
 * Seeds the demo organisation's assumption library (after db/seed-data.ts has stored the demo
 * datasets), through the same code as a person would use, so that the audit trail, the reviews and
 * the mail outbox are real:
 *
 * 1. the demo analyst requests a fit of four segments of the cohort dataset (lib/dal/fits.ts
 *    createFit), and the fit job runs here in-process exactly as the worker runs it (claim, the fit
 *    handler, completion transaction), on this thread;
 * 2. from that fit (lib/dal/assumptions.ts) the analyst drafts four assumptions with margins and
 *    rationale (the final value: estimate plus margins rounded up to two decimals):
 *    - SME term loans: submitted, reviewed and approved by the demo validator, and published with an
 *      effective date four months ago (so as-of queries before and after it answer differently);
 *    - Prime auto loans: published almost a year ago, due for review in 20 days;
 *    - Owner-occupied mortgages: submitted, waiting in the validator's queue;
 *    - Credit cards: reviewed and sent back with changes requested, waiting in the analyst's queue.
 *
 * The messages these transitions write to the outbox are sent by the worker when it starts.
 */
import { eq } from 'drizzle-orm';
import { addDays, addMonths, todayIso } from '@/lib/assumptions/dates';
import { conservativeValue, type Margins } from '@/lib/assumptions/margins';
import type { SessionUser } from '@/lib/auth/guard';
import { createDraft, transition } from '@/lib/dal/assumptions';
import { createFit, getFit } from '@/lib/dal/fits';
import { FIT_JOB } from '@/lib/jobs/kinds/fit';
import { claimJob, completeJob } from '@/lib/jobs/queue';
import { handlerFor } from '@/workers/registry';
import '@/workers/handlers/index';
import type { Db } from './connection';
import { datasets, fitRuns, users } from './schema';

const SEGMENTS = ['SME term loans', 'Prime auto loans', 'Owner-occupied mortgages', 'Credit cards'] as const;

async function person(db: Db, email: string): Promise<SessionUser> {
  const [u] = await db.select({ id: users.id, email: users.email, name: users.name, role: users.role }).from(users).where(eq(users.email, email));
  if (!u) throw new Error(`The demo account ${email} must be seeded before the demo assumptions.`);
  return u;
}

/** Runs one queued fit job to completion in this process, as workers/job-loop.ts does. */
async function runFitJob(db: Db, jobId: number): Promise<void> {
  const workerId = `seed-${process.pid}`;
  const claimed = await claimJob(db, workerId, [FIT_JOB]);
  if (!claimed || claimed.id !== jobId) throw new Error(`The demo fit job ${jobId} could not be claimed (another worker running on this database?).`);
  const handler = handlerFor(FIT_JOB);
  if (!handler) throw new Error('No fit job handler is registered.');
  // The bootstrap on this thread: the seed starts no worker threads.
  const threads = process.env.FIT_THREADS;
  process.env.FIT_THREADS = '0';
  try {
    const write = await handler({
      jobId: claimed.id,
      payload: claimed.payload,
      db,
      attempt: claimed.attempt,
      signal: new AbortController().signal,
      progress: async () => undefined,
    });
    if (!(await completeJob(db, claimed.id, workerId, write))) throw new Error(`The demo fit job ${jobId} was taken over before it finished.`);
  } finally {
    if (threads === undefined) delete process.env.FIT_THREADS;
    else process.env.FIT_THREADS = threads;
  }
}

/** The first day of the month `months` months before today (UTC). */
function monthsAgo(months: number): string {
  return `${addMonths(todayIso(), -months).slice(0, 8)}01`;
}

export async function seedDemoAssumptions(db: Db): Promise<void> {
  const t0 = Date.now();
  const analyst = await person(db, 'analyst@fenmoor.example');
  const validator = await person(db, 'validator@fenmoor.example');
  const [cohort] = await db.select({ id: datasets.id }).from(datasets).where(eq(datasets.kind, 'cohort')).limit(1);
  if (!cohort) throw new Error('The demo cohort dataset must be seeded before the demo assumptions.');

  const fit = await createFit(analyst, { datasetId: cohort.id, segments: [...SEGMENTS], level: 0.95, bootstrap: { replications: 200, seed: 20260101 } });
  const [run] = await db.select({ jobId: fitRuns.jobId }).from(fitRuns).where(eq(fitRuns.id, fit.id));
  await runFitJob(db, run.jobId!);

  // The analyst rounds the estimate plus margins up to two decimals, as a published figure would be.
  const fitted = await getFit(analyst, fit.id);
  const roundedUp = (segment: string, m: Margins) => {
    const results = fitted.results as { segments?: { segment: string; estimates?: { binomialMle?: { rho?: unknown } } }[] } | null;
    const rho = results?.segments?.find((s) => s.segment === segment)?.estimates?.binomialMle?.rho;
    if (typeof rho !== 'number') throw new Error(`The demo fit gave no binomialMle estimate for ${segment}.`);
    return Math.ceil(conservativeValue(rho, m) * 100 - 1e-9) / 100;
  };
  const periodsNote = 'annual cohorts of the demo cohort file';
  // SME term loans: the full maker-checker loop, published with an effective date in the past.
  const sme = await createDraft(analyst, {
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
    effectiveDate: monthsAgo(4),
  });
  await transition(analyst, sme.id, { action: 'submit' });
  await transition(validator, sme.id, { action: 'start-review' });
  await transition(validator, sme.id, {
    action: 'approve',
    comment: 'Profile interval, margins and the comparison with the supervisory correlation checked; approved for economic capital.',
  });
  await transition(validator, sme.id, { action: 'publish' });

  // Prime auto loans: published almost a year ago, so its review-by date is 20 days away (the library
  // shows it as due for review, and the scheduler sends the 30-day reminder).
  const auto = await createDraft(analyst, {
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
    effectiveDate: addDays(addMonths(todayIso(), -12), 20),
  });
  await transition(analyst, auto.id, { action: 'submit' });
  await transition(validator, auto.id, { action: 'start-review' });
  await transition(validator, auto.id, { action: 'approve', comment: 'Approved for economic capital and pricing.' });
  await transition(validator, auto.id, { action: 'publish' });

  // Owner-occupied mortgages: submitted, in the validator's queue.
  const mortgages = await createDraft(analyst, {
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
    effectiveDate: todayIso(),
  });
  await transition(analyst, mortgages.id, { action: 'submit' });

  // Credit cards: sent back by the validator with changes requested.
  const cards = await createDraft(analyst, {
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
    effectiveDate: todayIso(),
  });
  await transition(analyst, cards.id, { action: 'submit' });
  await transition(validator, cards.id, { action: 'start-review' });
  await transition(validator, cards.id, {
    action: 'request-changes',
    comment: 'A general estimation-error margin of 0 is not justified at fifteen years: the estimate is biased low. Add a margin with its rationale.',
  });

  console.log(`[seed] demo assumptions (fit ${fit.id}; four segments) in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
}
