/**
 * What the dataset and segment pages read besides the rows: how many fits and assumption versions
 * refer to a dataset (shown beside the delete button), and a segment's history across datasets.
 * Expected values are the sums of the small files below, added by hand.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { SessionUser } from '@/lib/auth/guard';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session as h } from '../../support/mock-session';

import { closeDb } from '@/db/connection';
import { POST } from '@/app/api/datasets/route';
import { getDataset } from '@/lib/dal/datasets';
import { createFit } from '@/lib/dal/fits';
import { getSegment, listSegmentDatasets } from '@/lib/dal/segments';
import { makeUser } from '../../support/users';
import { uploadRequest } from './support';

let analyst: SessionUser;
beforeAll(async () => {
  analyst = await makeUser('analyst');
  h.user = analyst;
});
afterAll(async () => {
  await closeDb();
});

const tag = Date.now().toString(36);
const SEG = `History ${tag}`;

async function upload(csv: string, name: string): Promise<number> {
  const res = await POST(uploadRequest({ kind: 'cohort', name }, csv));
  const body = await res.json();
  expect(res.status, JSON.stringify(body)).toBe(201);
  return body.id;
}

describe('dataset and segment history', () => {
  it('counts the fits that refer to a dataset, and lists a segment dataset by dataset with its sums', async () => {
    const a = await upload(`segment,period,obligors,defaults\n${SEG},2015,1000,10\n${SEG},2016,1100,22\n${SEG},2017,1200,12\n${SEG},2018,1300,26\n`, `H1 ${tag}`);
    const b = await upload(`segment,period,obligors,defaults\n${SEG},2019,500,5\n${SEG},2020,700,14\nOther ${tag},2019,50,1\n`, `H2 ${tag}`);

    expect((await getDataset(analyst, a)).usedBy).toEqual({ fits: 0, assumptions: 0 });
    await createFit(analyst, { datasetId: a });
    await createFit(analyst, { datasetId: a });
    expect((await getDataset(analyst, a)).usedBy).toEqual({ fits: 2, assumptions: 0 });
    expect((await getDataset(analyst, b)).usedBy).toEqual({ fits: 0, assumptions: 0 });

    const seg = (await getDataset(analyst, a)).segments[0];
    expect((await getSegment(analyst, seg.segmentId)).name).toBe(SEG);
    const history = await listSegmentDatasets(analyst, seg.segmentId);
    // Newest first; 1000+1100+1200+1300 = 4600 obligor-years and 10+22+12+26 = 70 defaults; 500+700 = 1200 and 19.
    expect(history.map((x) => [x.id, x.rows, x.firstPeriod, x.lastPeriod, x.obligors, x.defaults])).toEqual([
      [b, 2, 2019, 2020, 1200, 19],
      [a, 4, 2015, 2018, 4600, 70],
    ]);

    // Readable by every role that reads datasets; a role outside the list is refused by the DAL.
    const viewer = await makeUser('viewer');
    expect((await listSegmentDatasets(viewer, seg.segmentId)).map((x) => x.id)).toEqual([b, a]);
    await expect(listSegmentDatasets({ ...viewer, role: 'nobody' as never }, seg.segmentId)).rejects.toMatchObject({ code: expect.stringMatching(/^forbidden:/) });
  });
});
