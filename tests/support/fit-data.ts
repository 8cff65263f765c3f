import { createHash } from 'node:crypto';
import { getDb } from '@/db/connection';
import { cohortRows, datasets, segments, type AssetClass, type DatasetStatus } from '@/db/schema';

let counter = 0;

/** Panel A (binomialMle rho 0.037091, pd 0.013307 computed with SciPy 1.17 by tests/fixtures/engine/make_fixtures.py). */
export const PANEL_A = {
  obligors: [1000, 1050, 1100, 980, 1020, 1200, 1150, 1080, 990, 1010],
  defaults: [8, 12, 25, 30, 9, 5, 14, 20, 11, 6],
};

/**
 * Inserts a cohort dataset straight into the test database: one segment per entry of `panels`,
 * periods from `firstPeriod`. Returns the dataset id, its hash and the segment names.
 */
export async function makeCohortDataset(
  uploadedBy: number,
  panels: { obligors: number[]; defaults: number[]; assetClass?: AssetClass }[] = [PANEL_A],
  opts: { status?: DatasetStatus; firstPeriod?: number } = {},
): Promise<{ id: number; sha256: string; segments: string[] }> {
  counter += 1;
  const tag = `${Date.now().toString(36)}-${counter}`;
  const db = getDb();
  const sha256 = createHash('sha256').update(tag).digest('hex');
  const [ds] = await db.insert(datasets).values({
    kind: 'cohort',
    name: `Test cohorts ${tag}`,
    sha256,
    dedupeKey: sha256,
    status: opts.status ?? 'ready',
    sizeBytes: 100,
    fileName: `cohorts-${tag}.csv`,
    uploadedBy,
    segmentCount: panels.length,
    rowCount: panels.reduce((a, p) => a + p.obligors.length, 0),
  });
  const datasetId = Number(ds.insertId);
  const names: string[] = [];
  for (let s = 0; s < panels.length; s++) {
    const name = `Segment ${tag}-${s}`;
    const [seg] = await db.insert(segments).values({ name, assetClass: panels[s].assetClass ?? 'corporate' });
    names.push(name);
    await db.insert(cohortRows).values(
      panels[s].obligors.map((n, t) => ({
        datasetId,
        segmentId: Number(seg.insertId),
        period: (opts.firstPeriod ?? 2010) + t,
        obligors: n,
        defaults: panels[s].defaults[t],
      })),
    );
  }
  return { id: datasetId, sha256, segments: names };
}
