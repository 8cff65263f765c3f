import 'server-only';
import { asc, count, eq, inArray, sql } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '@/db/client';
import { assetClasses, cohortRows, datasets, segments, users, type AssetClass, type DatasetKind, type Segment } from '@/db/schema';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { AppError, parseOrThrow } from '@/lib/errors';

/**
 * Segments: the portfolios whose correlation is estimated. Created by the first upload that names
 * them; their settings (asset class for the supervisory benchmark, SME turnover, description,
 * owner) are edited here by analysts and administrators.
 */

export type SegmentDto = {
  id: number;
  name: string;
  assetClass: AssetClass;
  turnoverEurMillions: number | null;
  description: string | null;
  owner: { id: number; name: string } | null;
  /** cohort rows across datasets */
  rowCount: number;
  datasetCount: number;
  updatedAt: string;
};

function toDto(s: Segment, owner: { id: number; name: string } | null, rowCount: number, datasetCount: number): SegmentDto {
  return {
    id: s.id,
    name: s.name,
    assetClass: s.assetClass,
    turnoverEurMillions: s.turnoverEurMillions,
    description: s.description,
    owner,
    rowCount,
    datasetCount,
    updatedAt: s.updatedAt.toISOString(),
  };
}

async function ownersById(ids: (number | null)[]): Promise<Map<number, { id: number; name: string }>> {
  const wanted = [...new Set(ids.filter((x): x is number => x !== null))];
  if (wanted.length === 0) return new Map();
  const rows = await getDb().select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, wanted));
  return new Map(rows.map((r) => [r.id, r]));
}

export async function listSegments(actor: SessionUser): Promise<SegmentDto[]> {
  assertCan(actor, 'datasets:read');
  const db = getDb();
  const rows = await db.select().from(segments).orderBy(asc(segments.name));
  const stats = await db
    .select({ segmentId: cohortRows.segmentId, rows: count(), datasets: sql<number>`COUNT(DISTINCT ${cohortRows.datasetId})` })
    .from(cohortRows)
    .groupBy(cohortRows.segmentId);
  const byId = new Map(stats.map((s) => [s.segmentId, s]));
  const owners = await ownersById(rows.map((r) => r.ownerId));
  return rows.map((r) =>
    toDto(r, r.ownerId !== null ? owners.get(r.ownerId) ?? null : null, Number(byId.get(r.id)?.rows ?? 0), Number(byId.get(r.id)?.datasets ?? 0)),
  );
}

/** The datasets that hold rows of a segment: its history, dataset by dataset (newest first). */
export type SegmentDatasetDto = {
  id: number;
  name: string;
  kind: DatasetKind;
  createdAt: string;
  supersededById: number | null;
  rows: number;
  firstPeriod: number;
  lastPeriod: number;
  obligors: number;
  defaults: number;
};

export async function listSegmentDatasets(actor: SessionUser, segmentId: number): Promise<SegmentDatasetDto[]> {
  assertCan(actor, 'datasets:read');
  const rows = await getDb()
    .select({
      id: datasets.id,
      name: datasets.name,
      kind: datasets.kind,
      createdAt: datasets.createdAt,
      supersededById: datasets.supersededById,
      rows: count(),
      firstPeriod: sql<number>`MIN(${cohortRows.period})`,
      lastPeriod: sql<number>`MAX(${cohortRows.period})`,
      obligors: sql<number>`SUM(${cohortRows.obligors})`,
      defaults: sql<number>`SUM(${cohortRows.defaults})`,
    })
    .from(cohortRows)
    .innerJoin(datasets, eq(datasets.id, cohortRows.datasetId))
    .where(eq(cohortRows.segmentId, segmentId))
    .groupBy(datasets.id, datasets.name, datasets.kind, datasets.createdAt, datasets.supersededById)
    .orderBy(sql`${datasets.id} DESC`);
  return rows.map((r) => ({
    ...r,
    createdAt: r.createdAt.toISOString(),
    rows: Number(r.rows),
    firstPeriod: Number(r.firstPeriod),
    lastPeriod: Number(r.lastPeriod),
    obligors: Number(r.obligors),
    defaults: Number(r.defaults),
  }));
}

export async function getSegment(actor: SessionUser, id: number): Promise<SegmentDto> {
  assertCan(actor, 'datasets:read');
  const db = getDb();
  const [row] = await db.select().from(segments).where(eq(segments.id, id)).limit(1);
  if (!row) throw new AppError('not_found:segment', 'There is no such segment.');
  const [st] = await db
    .select({ rows: count(), datasets: sql<number>`COUNT(DISTINCT ${cohortRows.datasetId})` })
    .from(cohortRows)
    .where(eq(cohortRows.segmentId, id));
  const owners = await ownersById([row.ownerId]);
  return toDto(row, row.ownerId !== null ? owners.get(row.ownerId) ?? null : null, Number(st?.rows ?? 0), Number(st?.datasets ?? 0));
}

/** People who may own a segment: active analysts, validators and administrators (names only). */
export async function listPossibleOwners(actor: SessionUser): Promise<{ id: number; name: string }[]> {
  assertCan(actor, 'segments:manage');
  return getDb()
    .select({ id: users.id, name: users.name })
    .from(users)
    .where(sql`${users.active} = 1 AND ${users.role} IN ('analyst', 'validator', 'admin')`)
    .orderBy(asc(users.name));
}

/** Basel SME size adjustment applies to annual sales below EUR 50 million; below 5 it is treated as 5 (BCBS 2006, para 273). */
export const SME_TURNOVER_MAX = 50;

export const segmentSettingsSchema = z
  .object({
    assetClass: z.enum(assetClasses, { message: 'Choose one of the listed asset classes.' }),
    turnoverEurMillions: z
      .union([z.literal('').transform(() => null), z.coerce.number({ message: 'Give the turnover as a number of EUR millions.' }), z.null()])
      .optional()
      .transform((v) => (v === undefined ? null : v)),
    description: z
      .string()
      .trim()
      .max(2000, 'Keep the description under 2,000 characters.')
      .optional()
      .transform((v) => (v ? v : null)),
    ownerId: z
      .union([z.literal('').transform(() => null), z.coerce.number().int().positive(), z.null()])
      .optional()
      .transform((v) => (v === undefined ? null : v)),
  })
  .superRefine((v, ctx) => {
    if (v.assetClass === 'sme-corporate') {
      if (v.turnoverEurMillions === null || !Number.isFinite(v.turnoverEurMillions)) {
        ctx.addIssue({
          code: 'custom',
          path: ['turnoverEurMillions'],
          message: 'An SME corporate segment needs its typical annual turnover in EUR millions (the size adjustment of the supervisory correlation).',
        });
      } else if (v.turnoverEurMillions <= 0 || v.turnoverEurMillions >= SME_TURNOVER_MAX) {
        ctx.addIssue({
          code: 'custom',
          path: ['turnoverEurMillions'],
          message: `The SME turnover must be above 0 and below ${SME_TURNOVER_MAX} (EUR millions); at ${SME_TURNOVER_MAX} or more the segment is corporate. Values below 5 are treated as 5.`,
        });
      }
    } else if (v.turnoverEurMillions !== null) {
      ctx.addIssue({ code: 'custom', path: ['turnoverEurMillions'], message: 'A turnover is only used for SME corporate segments; leave it empty.' });
    }
  });
export type SegmentSettingsInput = z.input<typeof segmentSettingsSchema>;

export async function updateSegment(actor: SessionUser, id: number, input: SegmentSettingsInput): Promise<SegmentDto> {
  assertCan(actor, 'segments:manage', 'Only analysts and administrators can change segment settings.');
  const v = parseOrThrow(segmentSettingsSchema, input, 'invalid:segment', 'The segment settings are not valid.');
  const db = getDb();
  if (v.ownerId !== null) {
    const [owner] = await db.select({ id: users.id, active: users.active, role: users.role }).from(users).where(eq(users.id, v.ownerId));
    if (!owner || !owner.active || owner.role === 'viewer') {
      throw new AppError('invalid:segment', 'The owner must be an active analyst, validator or administrator.', { field: 'ownerId' });
    }
  }
  const [res] = await db
    .update(segments)
    .set({
      assetClass: v.assetClass,
      turnoverEurMillions: v.turnoverEurMillions,
      description: v.description,
      ownerId: v.ownerId,
      updatedAt: sql`CURRENT_TIMESTAMP(3)`,
    })
    .where(eq(segments.id, id));
  if (res.affectedRows === 0) throw new AppError('not_found:segment', 'There is no such segment.');
  return getSegment(actor, id);
}
