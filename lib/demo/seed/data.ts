import { createHash } from 'node:crypto';
import { gzipSync } from 'node:zlib';
import type { Db } from '@/db/connection';
import type { AssetClass } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { storeAcceptedDataset, type UploadMeta } from '@/lib/dal/dataset-store';
import { listSegments, updateSegment } from '@/lib/dal/segments';
import { convertLoanTape, validateCohortOrVintage, type Validated } from '@/lib/ingest/upload';
import { fenmoorCohortCsv, fenmoorLoanTapeChunks, fenmoorRestatedCohortCsv, fenmoorVintageCsv, LENDER_NAME, RESTATED_DEFINITION, RESTATED_YEAR } from '@/lib/demo';

/**
 * Seeds the invented demo lender's data (lib/demo: generated from the Vasicek model with fixed
 * seeds; no real institution's data) through the same validation and storage path as an upload:
 * a cohort file (5 segments, 15-25 annual cohorts), a vintage file and a loan-level tape of
 * 200,000 loans, converted here synchronously rather than by the worker. The demo analyst uploads
 * them and sets each segment's asset class through the segments DAL, as on the screen.
 */
const SEGMENT_SETTINGS: Record<string, { assetClass: AssetClass; turnoverEurMillions?: number; description: string }> = {
  'SME term loans': {
    assetClass: 'sme-corporate',
    turnoverEurMillions: 12,
    description: 'Amortising term loans to small and medium enterprises; typical annual turnover around EUR 12 million.',
  },
  'Owner-occupied mortgages': { assetClass: 'residential-mortgage', description: 'First-lien mortgages on owner-occupied homes.' },
  'Prime auto loans': { assetClass: 'other-retail', description: 'Car loans to prime borrowers, 36 to 72 months.' },
  'Unsecured personal loans': { assetClass: 'other-retail', description: 'Unsecured instalment loans to private customers.' },
  'Credit cards': { assetClass: 'qualifying-revolving', description: 'Revolving card balances of private customers.' },
};

async function store(db: Db, meta: Omit<UploadMeta, 'sha256' | 'sizeBytes'>, bytes: Buffer, v: Validated): Promise<number> {
  if (!v.ok) {
    const first = v.findings.find((f) => f.severity === 'error');
    throw new Error(`The demo ${meta.kind} file does not validate: ${first?.rule} at line ${first?.line}: ${first?.message}`);
  }
  const full: UploadMeta = { ...meta, sha256: createHash('sha256').update(bytes).digest('hex'), sizeBytes: bytes.length };
  const stored = await db.transaction((tx) => storeAcceptedDataset(tx, full, [gzipSync(bytes)], v));
  return stored.id;
}

async function* once(bytes: Buffer): AsyncGenerator<Buffer> {
  yield bytes;
}

/** Stores the demo datasets; returns the id of the cohort dataset (the demo fit's data). */
export async function seedDemoData(db: Db, analyst: SessionUser): Promise<{ cohortDatasetId: number }> {
  const max = Number.MAX_SAFE_INTEGER;
  const t0 = Date.now();

  const cohort = Buffer.from(fenmoorCohortCsv(), 'utf8');
  const cohortDatasetId = await store(
    db,
    {
      kind: 'cohort',
      name: `${LENDER_NAME}: annual cohorts by segment`,
      description: 'Invented demo data generated from the Vasicek one-factor model (lib/demo/fenmoor.ts).',
      fileName: 'fenmoor-cohorts.csv',
      uploadedBy: analyst.id,
      defaultDefinition: RESTATED_DEFINITION,
    },
    cohort,
    await validateCohortOrVintage('cohort', once(cohort), { maxBytes: max }),
  );

  const vintage = Buffer.from(fenmoorVintageCsv(), 'utf8');
  await store(
    db,
    {
      kind: 'vintage',
      name: `${LENDER_NAME}: monthly vintages (auto and personal loans)`,
      description: 'Invented demo data: vintages 2015-2023 observed to December 2024, converted to annual cohorts.',
      fileName: 'fenmoor-vintages.csv',
      uploadedBy: analyst.id,
    },
    vintage,
    await validateCohortOrVintage('vintage', once(vintage), { maxBytes: max }),
  );

  const tape = Buffer.from([...fenmoorLoanTapeChunks()].join(''), 'utf8');
  const options = { asOf: '2024-12-31', referenceMonthDay: '01-01', exitConvention: 'exits-stay' as const };
  const validated = await convertLoanTape(once(tape), { ...options, maxBytes: max });
  await store(
    db,
    {
      kind: 'loans',
      name: `${LENDER_NAME}: loan-level tape (200,000 loans)`,
      description: 'Invented demo loan tape, aggregated by the cohort method (1 January reference dates, exits stay in the denominator).',
      fileName: 'fenmoor-loans.csv',
      uploadedBy: analyst.id,
      loanOptions: options,
    },
    tape,
    validated,
  );

  for (const segment of await listSegments(analyst)) {
    const s = SEGMENT_SETTINGS[segment.name];
    if (!s) continue;
    await updateSegment(analyst, segment.id, { assetClass: s.assetClass, turnoverEurMillions: s.turnoverEurMillions ?? '', description: s.description });
  }
  console.log(`[seed] demo datasets stored in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
  return { cohortDatasetId };
}

/**
 * The restated cohort file (lib/demo/index.ts fenmoorRestatedCohortCsv): it supersedes the first
 * cohort dataset, states the definition of default on every row (the first two SME years at 120
 * days past due: an upload warning) and adds the year 2025, an invented downturn. The values
 * drawn from the first file are then flagged as resting on superseded data, with a new year.
 */
export async function seedRestatedCohorts(db: Db, analyst: SessionUser, supersedes: number): Promise<number> {
  const bytes = Buffer.from(fenmoorRestatedCohortCsv(), 'utf8');
  return store(
    db,
    {
      kind: 'cohort',
      name: `${LENDER_NAME}: annual cohorts by segment, restated with ${RESTATED_YEAR}`,
      description: `Invented demo data: the first cohort file restated (the definition of default on every row) and extended by ${RESTATED_YEAR}, an invented downturn year.`,
      fileName: 'fenmoor-cohorts-restated.csv',
      uploadedBy: analyst.id,
      supersedes,
    },
    bytes,
    await validateCohortOrVintage('cohort', once(bytes), { maxBytes: Number.MAX_SAFE_INTEGER }),
  );
}
