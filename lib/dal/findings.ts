import 'server-only';
import { and, asc, desc, eq, inArray, or, type SQL } from 'drizzle-orm';
import { getDb } from '@/db/client';
import type { DbOrTx } from '@/db/connection';
import {
  assumptions,
  assumptionVersions,
  datasets,
  findingEvents,
  findings,
  fitRuns,
  users,
  type AssumptionVersion,
  type Finding,
  type FindingSeverity,
  type FindingStatus,
  type FindingTarget,
} from '@/db/schema';
import { addDays, daysBetween, todayIso } from '@/lib/assumptions/dates';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { can } from '@/lib/auth/permissions';
import { appUrl } from '@/lib/env';
import { AppError, parseOrThrow } from '@/lib/errors';
import {
  findingChangeSchema,
  findingInputSchema,
  findingStatusLabels,
  isUnresolved,
  planFindingChange,
  severityRank,
  unresolvedStatuses,
  type FindingChangeInput,
  type FindingInput,
} from '@/lib/findings/rules';
import { queueMail } from '@/lib/mail/outbox';
import { renderFindingMail } from '@/lib/mail/templates';
import { canSeeVersion } from './assumptions/visibility';

/**
 * Validation findings: validators record them on a fit, a dataset or an assumption version; the
 * owner reports progress; validators close or accept them. Every read and write authorises here.
 * A high finding that is unresolved on a version, its fit or its dataset blocks the version's
 * approval (`blockingFinding`, called by the assumption lifecycle in its transaction).
 */
export type FindingTargetRef = { type: FindingTarget; id: number };

export type FindingDto = {
  id: number;
  target: FindingTargetRef & { label: string; url: string };
  title: string;
  description: string;
  severity: FindingSeverity;
  status: FindingStatus;
  statusLabel: string;
  unresolved: boolean;
  owner: { id: number; name: string; email: string } | null;
  dueDate: string;
  /** Whole days from today to the due date (negative when past). */
  daysToDue: number;
  overdue: boolean;
  rationale: string | null;
  recordedBy: { id: number; name: string; email: string } | null;
  createdAt: string;
  updatedAt: string;
};

export type FindingEventDto = {
  id: number;
  kind: 'recorded' | 'status' | 'comment';
  actorEmail: string;
  fromStatus: string | null;
  toStatus: string | null;
  comment: string | null;
  at: string;
};

export type FindingDetailDto = FindingDto & {
  events: FindingEventDto[];
  /** What the person looking may do. */
  may: { comment: boolean; statuses: FindingStatus[] };
};

// ---------------------------------------------------------------------------------------------
// Targets
// ---------------------------------------------------------------------------------------------

type TargetInfo = { label: string; url: string; versionStatus?: AssumptionVersion['status'] };

async function targetInfo(db: DbOrTx, refs: FindingTargetRef[]): Promise<Map<string, TargetInfo>> {
  const out = new Map<string, TargetInfo>();
  const ids = (t: FindingTarget) => [...new Set(refs.filter((r) => r.type === t).map((r) => r.id))];
  const versionIds = ids('version');
  if (versionIds.length) {
    const rows = await db
      .select({ id: assumptionVersions.id, version: assumptionVersions.version, status: assumptionVersions.status, segment: assumptions.segment })
      .from(assumptionVersions)
      .innerJoin(assumptions, eq(assumptions.id, assumptionVersions.assumptionId))
      .where(inArray(assumptionVersions.id, versionIds));
    for (const r of rows) out.set(`version:${r.id}`, { label: `${r.segment} v${r.version}`, url: `/library/versions/${r.id}`, versionStatus: r.status });
  }
  const fitIds = ids('fit');
  if (fitIds.length) {
    const rows = await db
      .select({ id: fitRuns.id, dataset: datasets.name })
      .from(fitRuns)
      .innerJoin(datasets, eq(datasets.id, fitRuns.datasetId))
      .where(inArray(fitRuns.id, fitIds));
    for (const r of rows) out.set(`fit:${r.id}`, { label: `fit ${r.id} of “${r.dataset}”`, url: `/fits/${r.id}` });
  }
  const datasetIds = ids('dataset');
  if (datasetIds.length) {
    const rows = await db.select({ id: datasets.id, name: datasets.name }).from(datasets).where(inArray(datasets.id, datasetIds));
    for (const r of rows) out.set(`dataset:${r.id}`, { label: `dataset ${r.id} “${r.name}”`, url: `/data/${r.id}` });
  }
  return out;
}

/** The targets whose findings concern a version: the version, its fit run and its dataset. */
export function targetsOfVersion(v: Pick<AssumptionVersion, 'id' | 'fitRunId' | 'datasetId'>): FindingTargetRef[] {
  return [
    { type: 'version', id: v.id },
    ...(v.fitRunId ? [{ type: 'fit' as const, id: v.fitRunId }] : []),
    ...(v.datasetId ? [{ type: 'dataset' as const, id: v.datasetId }] : []),
  ];
}

function targetCondition(refs: FindingTargetRef[]): SQL | undefined {
  if (!refs.length) return undefined;
  return or(...refs.map((r) => and(eq(findings.targetType, r.type), eq(findings.targetId, r.id))));
}

// ---------------------------------------------------------------------------------------------
// DTOs
// ---------------------------------------------------------------------------------------------

async function toDtos(db: DbOrTx, rows: Finding[], today: string): Promise<(FindingDto & { versionStatus?: AssumptionVersion['status'] })[]> {
  const info = await targetInfo(
    db,
    rows.map((r) => ({ type: r.targetType, id: r.targetId })),
  );
  const personIds = [...new Set(rows.flatMap((r) => [r.ownerId, r.createdBy]))];
  const people = personIds.length
    ? await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(inArray(users.id, personIds))
    : [];
  const byId = new Map(people.map((p) => [p.id, p]));
  return rows.map((r) => {
    const t = info.get(`${r.targetType}:${r.targetId}`);
    const days = daysBetween(today, r.dueDate);
    const unresolved = isUnresolved(r.status);
    return {
      id: r.id,
      target: { type: r.targetType, id: r.targetId, label: t?.label ?? `${r.targetType} ${r.targetId}`, url: t?.url ?? '#' },
      versionStatus: t?.versionStatus,
      title: r.title,
      description: r.description,
      severity: r.severity,
      status: r.status,
      statusLabel: findingStatusLabels[r.status],
      unresolved,
      owner: byId.get(r.ownerId) ?? null,
      dueDate: r.dueDate,
      daysToDue: days,
      overdue: unresolved && days < 0,
      rationale: r.rationale,
      recordedBy: byId.get(r.createdBy) ?? null,
      createdAt: r.createdAt.toISOString(),
      updatedAt: r.updatedAt.toISOString(),
    };
  });
}

/** Viewers do not see findings on versions they may not see (drafts and versions under review). */
function visibleTo(actor: SessionUser) {
  return (f: FindingDto & { versionStatus?: AssumptionVersion['status'] }) => !f.versionStatus || canSeeVersion(actor, f.versionStatus);
}

function strip<T extends { versionStatus?: unknown }>(f: T): Omit<T, 'versionStatus'> {
  const { versionStatus: _, ...rest } = f;
  return rest;
}

function order(a: FindingDto, b: FindingDto): number {
  return Number(b.unresolved) - Number(a.unresolved) || severityRank[a.severity] - severityRank[b.severity] || a.dueDate.localeCompare(b.dueDate) || a.id - b.id;
}

// ---------------------------------------------------------------------------------------------
// Reads
// ---------------------------------------------------------------------------------------------

/**
 * Findings, unresolved first, then by severity and due date: on the given targets, or all of them;
 * `unresolved` keeps those not yet closed or accepted.
 */
export async function listFindings(
  actor: SessionUser,
  filter: { targets?: FindingTargetRef[]; unresolved?: boolean; ownerId?: number } = {},
  now: Date = new Date(),
): Promise<FindingDto[]> {
  assertCan(actor, 'findings:read');
  const db = getDb();
  const conds: (SQL | undefined)[] = [];
  if (filter.targets) {
    if (!filter.targets.length) return [];
    conds.push(targetCondition(filter.targets));
  }
  if (filter.unresolved) conds.push(inArray(findings.status, [...unresolvedStatuses]));
  if (filter.ownerId) conds.push(eq(findings.ownerId, filter.ownerId));
  const rows = await db
    .select()
    .from(findings)
    .where(conds.length ? and(...conds) : undefined)
    .orderBy(desc(findings.id))
    .limit(1000);
  return (await toDtos(db, rows, todayIso(now))).filter(visibleTo(actor)).map(strip).sort(order);
}

/** The findings that concern a version: on it, on its fit and on its dataset. */
export async function listFindingsForVersion(actor: SessionUser, versionId: number, now: Date = new Date()): Promise<FindingDto[]> {
  assertCan(actor, 'findings:read');
  const [v] = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.id, versionId));
  if (!v) throw new AppError('not_found:assumption', 'There is no such assumption version.');
  return listFindings(actor, { targets: targetsOfVersion(v) }, now);
}

export async function getFinding(actor: SessionUser, id: number, now: Date = new Date()): Promise<FindingDetailDto> {
  assertCan(actor, 'findings:read');
  const db = getDb();
  const [row] = await db.select().from(findings).where(eq(findings.id, id));
  const [dto] = row ? (await toDtos(db, [row], todayIso(now))).filter(visibleTo(actor)) : [];
  if (!row || !dto) throw new AppError('not_found:finding', 'There is no such finding.');
  const events = await db.select().from(findingEvents).where(eq(findingEvents.findingId, id)).orderBy(asc(findingEvents.id));
  const statuses = (['open', 'in_remediation', 'remediated', 'accepted', 'closed'] as const).filter((to) => {
    try {
      planFindingChange({ actor, finding: row, to, comment: 'x' });
      return true;
    } catch {
      return false;
    }
  });
  return {
    ...strip(dto),
    events: events.map((e) => ({
      id: e.id,
      kind: e.kind as FindingEventDto['kind'],
      actorEmail: e.actorEmail,
      fromStatus: e.fromStatus,
      toStatus: e.toStatus,
      comment: e.comment,
      at: e.at.toISOString(),
    })),
    may: { comment: can(actor.role, 'findings:comment') || row.ownerId === actor.id, statuses },
  };
}

/** People who may own a finding: active analysts and validators. */
export async function listFindingOwners(actor: SessionUser): Promise<{ id: number; name: string; role: string }[]> {
  assertCan(actor, 'findings:record', 'Only validators record findings.');
  return getDb()
    .select({ id: users.id, name: users.name, role: users.role })
    .from(users)
    .where(and(eq(users.active, true), inArray(users.role, ['analyst', 'validator'])))
    .orderBy(asc(users.name));
}

/**
 * The unresolved high finding that blocks approving a version (on it, its fit or its dataset), or
 * null. Read inside the approval's transaction, so a finding recorded meanwhile is seen.
 */
export async function blockingFinding(db: DbOrTx, v: Pick<AssumptionVersion, 'id' | 'fitRunId' | 'datasetId'>): Promise<Finding | null> {
  const [row] = await db
    .select()
    .from(findings)
    .where(and(targetCondition(targetsOfVersion(v)), eq(findings.severity, 'high'), inArray(findings.status, [...unresolvedStatuses])))
    .orderBy(asc(findings.dueDate), asc(findings.id))
    .limit(1);
  return row ?? null;
}

/** The sentence of a refused approval, naming the finding. */
export function blockingSentence(f: Finding, target: string): string {
  return `The high-severity finding ${f.id} “${f.title}” on ${target} is ${findingStatusLabels[f.status]} (due ${f.dueDate}): a validator must close it, or accept it with a rationale, before this version can be approved.`;
}

export async function blockingRefusal(db: DbOrTx, v: Pick<AssumptionVersion, 'id' | 'fitRunId' | 'datasetId'>): Promise<AppError | null> {
  const f = await blockingFinding(db, v);
  if (!f) return null;
  const info = await targetInfo(db, [{ type: f.targetType, id: f.targetId }]);
  const target = f.targetType === 'version' && f.targetId === v.id ? 'this version' : (info.get(`${f.targetType}:${f.targetId}`)?.label ?? `${f.targetType} ${f.targetId}`);
  return new AppError('conflict:approve:open-finding', blockingSentence(f, target), { findingId: f.id });
}

// ---------------------------------------------------------------------------------------------
// Writes
// ---------------------------------------------------------------------------------------------

async function appendEvent(
  tx: DbOrTx,
  e: { findingId: number; kind: FindingEventDto['kind']; actor: SessionUser; from?: FindingStatus | null; to?: FindingStatus | null; comment?: string | null },
  at: Date,
): Promise<void> {
  await tx.insert(findingEvents).values({
    findingId: e.findingId,
    kind: e.kind,
    actorId: e.actor.id,
    actorEmail: e.actor.email,
    fromStatus: e.from ?? null,
    toStatus: e.to ?? null,
    comment: e.comment?.trim() || null,
    at,
  });
}

/** Records a finding (validators): the target must exist, the owner be an active analyst or validator, the due date today or later. */
export async function recordFinding(actor: SessionUser, input: FindingInput, now: Date = new Date()): Promise<FindingDto> {
  assertCan(actor, 'findings:record', 'Only validators record findings.');
  const f = parseOrThrow(findingInputSchema, input, 'invalid:finding', 'The finding is not valid.');
  const today = todayIso(now);
  if (f.dueDate < today) throw new AppError('invalid:finding', `The due date ${f.dueDate} is in the past: choose ${today} or later.`, { field: 'dueDate' });
  return getDb().transaction(async (tx) => {
    const info = await targetInfo(tx, [{ type: f.targetType, id: f.targetId }]);
    const target = info.get(`${f.targetType}:${f.targetId}`);
    if (!target) throw new AppError('invalid:finding', `There is no ${f.targetType === 'version' ? 'assumption version' : f.targetType} ${f.targetId}.`, { field: 'targetId' });
    const [owner] = await tx.select().from(users).where(eq(users.id, f.ownerId));
    if (!owner || !owner.active || (owner.role !== 'analyst' && owner.role !== 'validator')) {
      throw new AppError('invalid:finding', 'The owner must be an active analyst or validator.', { field: 'ownerId' });
    }
    const [res] = await tx.insert(findings).values({
      targetType: f.targetType,
      targetId: f.targetId,
      title: f.title,
      description: f.description,
      severity: f.severity,
      ownerId: f.ownerId,
      dueDate: f.dueDate,
      createdBy: actor.id,
      createdAt: now,
      updatedAt: now,
    });
    const id = Number(res.insertId);
    await appendEvent(tx, { findingId: id, kind: 'recorded', actor, to: 'open', comment: null }, now);
    await queueMail(tx, {
      kind: 'finding-recorded',
      to: owner.id === actor.id ? [] : [owner.email],
      message: renderFindingMail('finding-recorded', {
        id,
        title: f.title,
        severity: f.severity,
        status: 'open',
        dueDate: f.dueDate,
        target: target.label,
        recordedBy: actor.name,
        url: appUrl(`/findings/${id}`),
      }),
    });
    const [row] = await tx.select().from(findings).where(eq(findings.id, id));
    return strip((await toDtos(tx, [row], today))[0]);
  });
}

/**
 * Changes a finding's status and/or adds a comment, with a history row for each. The status rules
 * are lib/findings/rules.ts; a comment alone needs findings:comment or ownership.
 */
export async function changeFinding(actor: SessionUser, id: number, input: FindingChangeInput, now: Date = new Date()): Promise<FindingDetailDto> {
  assertCan(actor, 'findings:read');
  const c = parseOrThrow(findingChangeSchema, input, 'invalid:finding', 'The change is not valid.');
  await getDb().transaction(async (tx) => {
    const [row] = await tx.select().from(findings).where(eq(findings.id, id)).for('update');
    if (!row) throw new AppError('not_found:finding', 'There is no such finding.');
    if (c.status) {
      const { from, to } = planFindingChange({ actor, finding: row, to: c.status, comment: c.comment });
      await tx
        .update(findings)
        .set({ status: to, updatedAt: now, ...(to === 'accepted' ? { rationale: c.comment!.trim() } : from === 'accepted' ? { rationale: null } : {}) })
        .where(eq(findings.id, id));
      await appendEvent(tx, { findingId: id, kind: 'status', actor, from, to, comment: c.comment }, now);
    } else {
      if (!can(actor.role, 'findings:comment') && row.ownerId !== actor.id) {
        throw new AppError('forbidden:finding-comment', "Only analysts, validators and the finding's owner comment on findings.");
      }
      await tx.update(findings).set({ updatedAt: now }).where(eq(findings.id, id));
      await appendEvent(tx, { findingId: id, kind: 'comment', actor, comment: c.comment }, now);
    }
  });
  return getFinding(actor, id, now);
}

// ---------------------------------------------------------------------------------------------
// Reminders (the scheduler)
// ---------------------------------------------------------------------------------------------

/** How many days before its due date an unresolved finding's owner is reminded. */
export const FINDING_REMINDER_DAYS = 7;

/**
 * Queues the reminders of unresolved findings, once each (deduplicated): to the owner and the
 * validator who recorded it, 7 days before the due date or closer, and once it is past. Returns
 * the number of messages written.
 */
export async function queueFindingReminders(db: DbOrTx, now: Date = new Date()): Promise<number> {
  const today = todayIso(now);
  const rows = await db.select().from(findings).where(inArray(findings.status, [...unresolvedStatuses]));
  if (!rows.length) return 0;
  const dtos = await toDtos(db, rows, today);
  let written = 0;
  for (const f of dtos) {
    const kind = f.daysToDue < 0 ? 'finding-overdue' : f.daysToDue <= FINDING_REMINDER_DAYS ? 'finding-due-soon' : null;
    if (!kind) continue;
    const to = [f.owner?.email, f.recordedBy?.email].filter((x): x is string => !!x);
    written += await queueMail(db, {
      kind,
      to,
      dedupeKey: (addr) => `${kind}:${f.id}:${f.dueDate}:${addr}`,
      message: renderFindingMail(kind, {
        id: f.id,
        title: f.title,
        severity: f.severity,
        status: f.statusLabel,
        dueDate: f.dueDate,
        target: f.target.label,
        daysLeft: f.daysToDue,
        url: appUrl(`/findings/${f.id}`),
      }),
    });
  }
  return written;
}

/**
 * What a page's findings section needs: the findings of the target (for a version, with those on
 * its fit and dataset), and for validators the possible owners and a default due date (30 days).
 */
export async function findingsPanel(
  actor: SessionUser,
  target: FindingTargetRef,
  now: Date = new Date(),
): Promise<{ findings: FindingDto[]; owners: { id: number; name: string; role: string }[] | null; defaultDue: string; target: FindingTargetRef }> {
  const list = target.type === 'version' ? await listFindingsForVersion(actor, target.id, now) : await listFindings(actor, { targets: [target] }, now);
  return {
    findings: list,
    owners: can(actor.role, 'findings:record') ? await listFindingOwners(actor) : null,
    defaultDue: addDays(todayIso(now), 30),
    target,
  };
}
