import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb } from '@/db/connection';
import type { SessionUser } from '@/lib/auth/guard';
import { createDraft, getVersionPage, transition } from '@/lib/dal/assumptions';
import { makeUser } from '../../support/users';
import { draftBody, makeFitRun } from '../../support/assumptions';

/** The assumption page's diff: against the previous version by default, or against another version asked for. */
let analyst: SessionUser;
let validator: SessionUser;
let viewer: SessionUser;
const segment = `Diff segment ${Date.now().toString(36)}`;
const ids: number[] = [];
let otherSegmentVersion: number;

async function publishWithGeneralMargin(general: number, effectiveDate: string): Promise<number> {
  const { fitId } = await makeFitRun(analyst.id, segment);
  const body = draftBody(fitId, segment, { effectiveDate });
  body.margins.general = { value: general, rationale: `General margin ${general}.` };
  // The lifecycle's clock on the effective date: approved and published that day.
  const at = new Date(`${effectiveDate}T12:00:00Z`);
  const v = await createDraft(analyst, body as never, at);
  await transition(analyst, v.id, { action: 'submit' }, at);
  await transition(validator, v.id, { action: 'start-review' }, at);
  await transition(validator, v.id, { action: 'approve', comment: 'Checked.' }, at);
  await transition(validator, v.id, { action: 'publish' }, at);
  return v.id;
}

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  viewer = await makeUser('viewer');
  ids.push(await publishWithGeneralMargin(0.02, '2026-01-01'));
  ids.push(await publishWithGeneralMargin(0.03, '2026-02-01'));
  const { fitId } = await makeFitRun(analyst.id, segment);
  const body = draftBody(fitId, segment, { effectiveDate: '2026-03-01' });
  body.margins.general = { value: 0.05, rationale: 'General margin 0.05.' };
  ids.push((await createDraft(analyst, body as never)).id);
  const other = `${segment} (other)`;
  const { fitId: otherFit } = await makeFitRun(analyst.id, other);
  otherSegmentVersion = (await createDraft(analyst, draftBody(otherFit, other) as never)).id;
});
afterAll(async () => {
  await closeDb();
});

const general = (changes: { field: string; before: unknown; after: unknown }[] | null) => changes?.find((c) => c.field === 'marginGeneral');

describe('the diff between versions', () => {
  it('by default against the previous version', async () => {
    const page = await getVersionPage(analyst, ids[2]);
    expect(page.comparedWith).toEqual({ id: ids[1], version: 2 });
    expect(general(page.changesFromPrevious)).toMatchObject({ before: 0.03, after: 0.05 });
  });

  it('against an earlier version when asked', async () => {
    const page = await getVersionPage(analyst, ids[2], new Date(), ids[0]);
    expect(page.comparedWith).toEqual({ id: ids[0], version: 1 });
    expect(general(page.changesFromPrevious)).toMatchObject({ before: 0.02, after: 0.05 });
    expect(page.changesFromPrevious?.find((c) => c.field === 'effectiveDate')).toMatchObject({ before: '2026-01-01', after: '2026-03-01' });
  });

  it('a version of another assumption, or one the person may not see, is not compared: the previous version is', async () => {
    expect((await getVersionPage(analyst, ids[2], new Date(), otherSegmentVersion)).comparedWith).toEqual({ id: ids[1], version: 2 });
    // A viewer sees published versions only: asking v2's page to compare with the v3 draft falls back to v1.
    const page = await getVersionPage(viewer, ids[1], new Date(), ids[2]);
    expect(page.comparedWith).toEqual({ id: ids[0], version: 1 });
    expect(page.versions.map((v) => v.version)).toEqual([2, 1]);
  });

  it('the first version has nothing to compare with', async () => {
    const page = await getVersionPage(analyst, ids[0], new Date(), ids[0]);
    expect(page.comparedWith).toBeNull();
    expect(page.changesFromPrevious).toBeNull();
  });
});
