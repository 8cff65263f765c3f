import 'server-only';
import { and, asc, eq, gt, inArray, sql } from 'drizzle-orm';
import type { Db, DbOrTx, Tx } from '@/db/connection';
import { assumptions, assumptionVersions, cohortRows, datasets, evidenceBacktests, segments, users, type AssumptionVersion, type BacktestStatus } from '@/db/schema';
import { evidenceCautionOf } from '@/lib/assumptions/consumer';
import { backtestSentences, type BacktestVerdict, type StoredBacktest } from '@/lib/assumptions/monitoring';
import { appUrl } from '@/lib/env';
import { MONITOR_BACKTEST_JOB } from '@/lib/jobs/kinds/monitor-backtest-payload';
import { enqueueJob } from '@/lib/jobs/queue';
import { queueMail } from '@/lib/mail/outbox';
import { renderEvidenceMail } from '@/lib/mail/templates';
import { ENGINE_VERSION } from '@/lib/stats/version';
import { makerIds } from './assumptions/actors';
import { prepared } from './prepared';

/**
 * Evidence that ages: whether the dataset an assumption was drawn from has been superseded, or a
 * newer dataset covers later years of its segment; the monitoring backtests of published values on
 * those years; the sweep the scheduler runs (flag e-mail once, backtest queued once). Checks no
 * role: the assumption reads and the consumer API authorise, and the scheduler and the job call
 * this directly.
 */
export type BacktestDto = {
  datasetId: number;
  periods: string[];
  status: BacktestStatus;
  /** The tested values (the published value and its PD) and lib/stats/backtest.ts's result. */
  result: StoredBacktest | null;
  verdict: BacktestVerdict | null;
  summary: string | null;
  years: string[];
  error: string | null;
  engineVersion: string | null;
  finishedAt: string | null;
};

export type EvidenceDto = {
  /** The dataset the value was drawn from has been superseded. */
  superseded: boolean;
  /** The dataset to look at instead: the end of the supersession chain, or the newest dataset with later years of the segment. */
  newerDatasetId: number | null;
  newerDatasetName: string | null;
  /** Years of the segment in that dataset after the value's window. */
  newPeriods: string[];
  /** superseded or new periods: the evidence has aged. */
  flagged: boolean;
  backtest: BacktestDto | null;
};

const NONE: EvidenceDto = { superseded: false, newerDatasetId: null, newerDatasetName: null, newPeriods: [], flagged: false, backtest: null };

type VersionRef = Pick<AssumptionVersion, 'id' | 'datasetId' | 'windowTo'> & { segment: string };

/** The evidence of each version (by id). */
export async function evidenceOf(db: DbOrTx, versions: readonly VersionRef[]): Promise<Map<number, EvidenceDto>> {
  const out = new Map<number, EvidenceDto>();
  const withData = versions.filter((v) => v.datasetId !== null);
  for (const v of versions) out.set(v.id, NONE);
  if (!withData.length) return out;
  // One version (the consumer API's answer for a segment) reads through prepared queries, built
  // once per handle (./prepared.ts); a list builds its queries for its own set of names and ids.
  const all = await prepared(db, 'evidence-datasets', () =>
    db.select({ id: datasets.id, name: datasets.name, status: datasets.status, createdAt: datasets.createdAt, supersededById: datasets.supersededById }).from(datasets).prepare(),
  ).execute();
  const byId = new Map(all.map((d) => [d.id, d]));
  const names = [...new Set(withData.map((v) => v.segment))];
  const minTo = Math.min(...withData.map((v) => Number(v.windowTo) || 0));
  const laterRows = () =>
    db
      .select({ datasetId: cohortRows.datasetId, segment: segments.name, period: cohortRows.period })
      .from(cohortRows)
      .innerJoin(segments, eq(segments.id, cohortRows.segmentId));
  const later =
    names.length === 1
      ? await prepared(db, 'evidence-later-rows-of-segment', () =>
          laterRows()
            .where(and(eq(segments.name, sql.placeholder('segment')), gt(cohortRows.period, sql.placeholder('after'))))
            .orderBy(asc(cohortRows.period))
            .prepare(),
        ).execute({ segment: names[0], after: minTo })
      : await laterRows()
          .where(and(inArray(segments.name, names), gt(cohortRows.period, minTo)))
          .orderBy(asc(cohortRows.period));
  const periodsOf = (datasetId: number, segment: string, after: number) =>
    later.filter((r) => r.datasetId === datasetId && r.segment === segment && r.period > after).map((r) => String(r.period));
  const tests =
    withData.length === 1
      ? await prepared(db, 'evidence-backtests-of-version', () =>
          db.select().from(evidenceBacktests).where(eq(evidenceBacktests.versionId, sql.placeholder('versionId'))).prepare(),
        ).execute({ versionId: withData[0].id })
      : await db
          .select()
          .from(evidenceBacktests)
          .where(inArray(evidenceBacktests.versionId, withData.map((v) => v.id)));
  for (const v of withData) {
    const own = byId.get(v.datasetId!);
    if (!own) continue;
    const after = Number(v.windowTo) || 0;
    // The end of the supersession chain (a chain never loops: only a newer upload supersedes).
    let end = own;
    for (let i = 0; i < 1000 && end.supersededById !== null && byId.has(end.supersededById); i++) end = byId.get(end.supersededById)!;
    const superseded = own.supersededById !== null;
    let newer: typeof own | null = superseded ? end : null;
    let newPeriods = newer ? periodsOf(newer.id, v.segment, after) : [];
    if (!newPeriods.length) {
      // The newest live dataset, uploaded after the version's, with later years of the segment.
      const candidates = [...new Set(later.filter((r) => r.segment === v.segment && r.period > after).map((r) => r.datasetId))]
        .map((id) => byId.get(id)!)
        .filter((d) => d && d.id !== own.id && d.status === 'ready' && d.supersededById === null && d.createdAt.getTime() >= own.createdAt.getTime())
        .sort((a, b) => b.createdAt.getTime() - a.createdAt.getTime() || b.id - a.id);
      if (candidates.length) {
        newer = candidates[0];
        newPeriods = periodsOf(newer.id, v.segment, after);
      }
    }
    const test = newer ? tests.find((t) => t.versionId === v.id && t.datasetId === newer!.id) : undefined;
    out.set(v.id, {
      superseded,
      newerDatasetId: newer?.id ?? null,
      newerDatasetName: newer?.name ?? null,
      newPeriods,
      flagged: superseded || newPeriods.length > 0,
      backtest: test ? toBacktestDto(test) : null,
    });
  }
  return out;
}

function toBacktestDto(t: typeof evidenceBacktests.$inferSelect): BacktestDto {
  const result = (t.result as StoredBacktest | null) ?? null;
  const words = result ? backtestSentences(result) : null;
  return {
    datasetId: t.datasetId,
    periods: t.periods as string[],
    status: t.status,
    result,
    verdict: words?.verdict ?? null,
    summary: words?.summary ?? null,
    years: words?.years ?? [],
    error: t.error,
    engineVersion: t.engineVersion,
    finishedAt: t.finishedAt?.toISOString() ?? null,
  };
}

/** The flag in a sentence, for cautions (the version page, the library, the consumer API). */
export function evidenceCaution(e: EvidenceDto): string | null {
  return evidenceCautionOf(e);
}

// ---------------------------------------------------------------------------------------------
// The scheduler's sweep
// ---------------------------------------------------------------------------------------------

export type EvidenceSweepReport = { flagged: number; mails: number; backtestsQueued: number };

/**
 * For every published version whose evidence has aged: the e-mail to its author and validator
 * (once per newer dataset), and a monitoring backtest of its value on the new years (once per
 * newer dataset, by the monitor-backtest job).
 */
export async function sweepEvidence(db: Db, now: Date = new Date()): Promise<EvidenceSweepReport> {
  const report: EvidenceSweepReport = { flagged: 0, mails: 0, backtestsQueued: 0 };
  const live = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(eq(assumptionVersions.status, 'published'));
  if (!live.length) return report;
  const evidence = await evidenceOf(
    db,
    live.map(({ v, segment }) => ({ id: v.id, datasetId: v.datasetId, windowTo: v.windowTo, segment })),
  );
  for (const { v, segment } of live) {
    const e = evidence.get(v.id)!;
    if (!e.flagged || e.newerDatasetId === null) continue;
    report.flagged += 1;
    const makers = await makerIds(db, v);
    const people = await db
      .select({ email: users.email })
      .from(users)
      .where(and(eq(users.active, true), inArray(users.id, [...makers, ...(v.validatorId ? [v.validatorId] : [])])));
    report.mails += await queueMail(db, {
      kind: 'evidence-aged',
      to: people.map((p) => p.email),
      versionId: v.id,
      dedupeKey: (addr) => `evidence-aged:${v.id}:${e.newerDatasetId}:${addr}`,
      message: renderEvidenceMail({
        segment,
        version: v.version,
        caution: evidenceCaution(e)!,
        backtest: e.newPeriods.length > 0,
        url: appUrl(`/library/versions/${v.id}`),
      }),
    });
    if (e.newPeriods.length && !e.backtest) {
      await db.transaction(async (tx) => {
        const [res] = await tx
          .insert(evidenceBacktests)
          .ignore()
          .values({ versionId: v.id, datasetId: e.newerDatasetId!, periods: e.newPeriods, status: 'queued', createdAt: now });
        if (!res.affectedRows) return; // another worker queued it
        const backtestId = Number(res.insertId);
        const jobId = await enqueueJob(tx, {
          kind: MONITOR_BACKTEST_JOB,
          payload: { backtestId, versionId: v.id, datasetId: e.newerDatasetId!, periods: e.newPeriods },
          createdBy: null,
        });
        await tx.update(evidenceBacktests).set({ jobId }).where(eq(evidenceBacktests.id, backtestId));
        report.backtestsQueued += 1;
      });
    }
  }
  return report;
}

// ---------------------------------------------------------------------------------------------
// The monitor-backtest job
// ---------------------------------------------------------------------------------------------

/** What a backtest tests: the published value and its PD, and the new years' counts of the segment. */
export async function loadBacktestInput(
  db: DbOrTx,
  p: { versionId: number; datasetId: number; periods: string[] },
): Promise<{ pd: number; rho: number; periods: string[]; obligors: number[]; defaults: number[] }> {
  const [row] = await db
    .select({ v: assumptionVersions, segment: assumptions.segment })
    .from(assumptionVersions)
    .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
    .where(eq(assumptionVersions.id, p.versionId));
  if (!row) throw new Error(`Assumption version ${p.versionId} no longer exists.`);
  const rows = await db
    .select({ period: cohortRows.period, obligors: cohortRows.obligors, defaults: cohortRows.defaults })
    .from(cohortRows)
    .innerJoin(segments, eq(segments.id, cohortRows.segmentId))
    .where(and(eq(cohortRows.datasetId, p.datasetId), eq(segments.name, row.segment), inArray(cohortRows.period, p.periods.map(Number))))
    .orderBy(asc(cohortRows.period));
  if (!rows.length) throw new Error(`Dataset ${p.datasetId} has no rows of “${row.segment}” in ${p.periods.join(', ')}.`);
  return {
    pd: row.v.pd,
    rho: row.v.finalValue,
    periods: rows.map((r) => String(r.period)),
    obligors: rows.map((r) => r.obligors),
    defaults: rows.map((r) => r.defaults),
  };
}

export async function writeBacktest(tx: Tx, backtestId: number, result: StoredBacktest, now: Date = new Date()): Promise<void> {
  await tx
    .update(evidenceBacktests)
    .set({ status: 'done', result, error: null, engineVersion: ENGINE_VERSION, finishedAt: now })
    .where(eq(evidenceBacktests.id, backtestId));
}


/** The jobs of backtests still queued (the demo seed runs them in-process). */
export async function queuedBacktestJobs(db: DbOrTx): Promise<number[]> {
  const rows = await db
    .select({ jobId: evidenceBacktests.jobId })
    .from(evidenceBacktests)
    .where(eq(evidenceBacktests.status, 'queued'))
    .orderBy(asc(evidenceBacktests.id));
  return rows.map((r) => r.jobId).filter((x): x is number => x !== null);
}
