import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { eq } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { assumptions, assumptionVersions } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import * as draftRoute from '@/app/api/assumptions/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session } from '../../support/mock-session';

let analyst: SessionUser;

beforeAll(async () => {
  analyst = await makeUser('analyst');
  session.user = analyst;
});
afterAll(async () => {
  session.user = null;
  await closeDb();
});

describe('concurrent drafts of one segment', () => {
  // Found by trying it: five drafts of one new segment sent at once gave one 201 and four 500s
  // (deadlock on the segment's row, or a duplicate version number).
  it('one request wins with 201, every other one is told 409 with a sentence; one version is stored', async () => {
    for (let round = 0; round < 4; round++) {
      const segment = `Race segment ${Date.now().toString(36)}-${round}`;
      const { fitId } = await makeFitRun(analyst.id, segment);
      const answers = await Promise.all(Array.from({ length: 6 }, () => call(draftRoute.POST, { body: draftBody(fitId, segment) })));
      const statuses = answers.map((a) => a.status).sort();
      expect(statuses).toEqual([201, 409, 409, 409, 409, 409]);
      for (const a of answers.filter((x) => x.status === 409)) {
        expect(a.body.code).toBe('conflict:open-version');
        expect(String(a.body.message)).toMatch(new RegExp(`^Version 1 of ${segment} is still draft`));
      }
      const [a] = await getDb().select().from(assumptions).where(eq(assumptions.segment, segment));
      const versions = await getDb().select().from(assumptionVersions).where(eq(assumptionVersions.assumptionId, a.id));
      expect(versions.map((v) => v.version)).toEqual([1]);
    }
  });
});
