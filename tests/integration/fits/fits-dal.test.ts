import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { count, eq, inArray } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { fitRuns, jobs } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { cancelFit, createFit, getFit } from '@/lib/dal/fits';
import { AppError } from '@/lib/errors';
import { ENGINE_VERSION } from '@/lib/stats/version';
import { makeCohortDataset } from '../../support/fit-data';
import { makeUser } from '../../support/users';

let analyst: SessionUser;
let validator: SessionUser;
let viewer: SessionUser;
let admin: SessionUser;
let dataset: { id: number; sha256: string; segments: string[] };

beforeAll(async () => {
  [analyst, validator, viewer, admin] = await Promise.all([makeUser('analyst'), makeUser('validator'), makeUser('viewer'), makeUser('admin')]);
  dataset = await makeCohortDataset(analyst.id);
});
afterAll(async () => {
  await closeDb();
});

async function failure(p: Promise<unknown>): Promise<AppError> {
  try {
    await p;
  } catch (e) {
    expect(e).toBeInstanceOf(AppError);
    return e as AppError;
  }
  throw new Error('expected the call to fail');
}

async function fitRunCount() {
  const [r] = await getDb().select({ n: count() }).from(fitRuns);
  return r.n;
}

describe('requesting a fit', () => {
  it('an analyst gets { id, status: queued } and the run records hash, engine version, seeds and one job per segment', async () => {
    const res = await createFit(analyst, { datasetId: dataset.id, level: 0.9, bootstrap: { replications: 50, seed: 11 } });
    expect(res.status).toBe('queued');
    const [row] = await getDb().select().from(fitRuns).where(eq(fitRuns.id, res.id));
    expect(row.datasetSha256).toBe(dataset.sha256);
    expect(row.engineVersion).toBe(ENGINE_VERSION);
    expect(row.seeds).toEqual({ bootstrap: 11, audit: null, breakTest: null });
    expect(row.createdBy).toBe(analyst.id);
    // One job per segment, in the order of the dataset's segments.
    const dto = await getFit(viewer, res.id);
    expect(dto.jobIds).toHaveLength(dataset.segments.length);
    const queued = await getDb().select().from(jobs).where(inArray(jobs.id, dto.jobIds)).orderBy(jobs.id);
    expect(queued.map((j) => [j.kind, j.status])).toEqual(dataset.segments.map(() => ['fit', 'queued']));
    expect(queued.map((j) => j.payload)).toEqual(
      dataset.segments.map((name, position) => ({ fitRunId: res.id, datasetId: dataset.id, datasetSha256: dataset.sha256, segment: { position, name } })),
    );
    expect(dto).toMatchObject({ id: res.id, status: 'queued', progress: 0, results: null, error: null });
    expect(dto.request.level).toBe(0.9);
    // every model and a 10-year rolling window unless asked otherwise
    expect(dto.request).toMatchObject({ models: ['independent', 'ar1'], rollingWindow: 10 });
    const withBreak = await createFit(analyst, { datasetId: dataset.id, models: ['ar1', 'independent'], rollingWindow: 8, breakTest: { replications: 200, seed: 12 } });
    const [second] = await getDb().select().from(fitRuns).where(eq(fitRuns.id, withBreak.id));
    expect(second.seeds).toEqual({ bootstrap: null, audit: null, breakTest: 12 });
    expect((await getFit(viewer, withBreak.id)).request).toMatchObject({ models: ['ar1', 'independent'], rollingWindow: 8, breakTest: { replications: 200, seed: 12 } });
  });

  it('a validator may run fits too', async () => {
    await expect(createFit(validator, { datasetId: dataset.id })).resolves.toMatchObject({ status: 'queued' });
  });

  it('viewers and administrators are refused with 403 and nothing is written', async () => {
    const before = await fitRunCount();
    for (const actor of [viewer, admin]) {
      const e = await failure(createFit(actor, { datasetId: dataset.id }));
      expect(e.code).toBe('forbidden:fits:run');
      expect(e.status).toBe(403);
    }
    expect(await fitRunCount()).toBe(before);
  });

  it('a missing dataset and one still converting are both 404 (unavailable), nothing written', async () => {
    const processing = await makeCohortDataset(analyst.id, undefined, { status: 'processing' });
    const before = await fitRunCount();
    for (const id of [987654321, processing.id]) {
      const e = await failure(createFit(analyst, { datasetId: id }));
      expect(e.status).toBe(404);
      expect(e.code).toBe('not_found:dataset');
      expect(e.message).toContain(String(id));
    }
    expect(await fitRunCount()).toBe(before);
  });

  it('bad requests are 422 and name the field and the problem', async () => {
    const cases: [unknown, string | null, RegExp][] = [
      [{ datasetId: dataset.id, segments: ['No such segment'] }, 'segments', /no segment named "No such segment"/],
      [{ datasetId: dataset.id, from: 2015, to: 2012 }, 'to', /ends \(2012\) before it starts \(2015\)/],
      [{ datasetId: dataset.id, from: 2018 }, 'from', /has 2 periods from 2018 .* at least 3/],
      [{ datasetId: dataset.id, level: 1.5 }, 'level', /between 0.5 and 0.999/],
      [{ datasetId: dataset.id, bootstrap: { replications: 5, seed: 1 } }, 'bootstrap.replications', /at least 20/],
      [{ datasetId: dataset.id, models: [] }, 'models', /at least one model/],
      [{ datasetId: dataset.id, models: ['garch'] }, 'models.0', /A model is one of independent, ar1/],
      [{ datasetId: dataset.id, models: ['ar1', 'ar1'] }, 'models', /each model once/],
      [{ datasetId: dataset.id, rollingWindow: 2 }, 'rollingWindow', /at least 3 years/],
      [{ datasetId: dataset.id, breakTest: { replications: 10, seed: 1 } }, 'breakTest.replications', /The break test needs at least 20 replications/],
      [{ datasetId: 'seven' }, 'datasetId', /^Choose a dataset/],
      [{ datasetId: dataset.id, extra: true }, null, /Unrecognized key/i],
    ];
    const before = await fitRunCount();
    for (const [body, field, message] of cases) {
      const e = await failure(createFit(analyst, body));
      expect(e.status).toBe(422);
      expect(e.message).toMatch(message);
      expect(e.details?.field ?? null, JSON.stringify(body)).toBe(field);
    }
    expect(await fitRunCount()).toBe(before);
  });

  it('an unknown fit run is 404', async () => {
    const e = await failure(getFit(viewer, 987654321));
    expect(e.status).toBe(404);
  });
});

describe('cancelling a fit', () => {
  it('only the person who started it may cancel; a queued fit is cancelled at once', async () => {
    const { id } = await createFit(analyst, { datasetId: dataset.id });
    const e = await failure(cancelFit(validator, id));
    expect(e.status).toBe(403);
    const viewerTry = await failure(cancelFit(viewer, id));
    expect(viewerTry.status).toBe(403);
    const after = await cancelFit(analyst, id);
    expect(after.status).toBe('cancelled');
    expect((await getFit(analyst, id)).status).toBe('cancelled');
    const again = await failure(cancelFit(analyst, id));
    expect(again.status).toBe(409);
  });
});
