/**
 * An administrator cannot approve by making themselves a validator (nobody changes their own role,
 * through the route too), and when a second administrator does it for them during the review, the
 * version's audit trail shows it beside the approval.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { closeDb } from '@/db/connection';
import type { SessionUser } from '@/lib/auth/guard';
import { createDraft, getVersionPage, transition } from '@/lib/dal/assumptions';
import { changeRole } from '@/lib/dal/users';
import * as userRoute from '@/app/api/admin/users/[id]/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session } from '../../support/mock-session';

let analyst: SessionUser;
let admin: SessionUser;
let secondAdmin: SessionUser;

beforeAll(async () => {
  analyst = await makeUser('analyst');
  admin = await makeUser('admin');
  secondAdmin = await makeUser('admin');
});
afterAll(async () => {
  session.user = null;
  await closeDb();
});

async function submitted(): Promise<number> {
  const segment = `Role change ${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 6)}`;
  const { fitId } = await makeFitRun(analyst.id, segment);
  const v = await createDraft(analyst, draftBody(fitId, segment) as never);
  await transition(analyst, v.id, { action: 'submit' });
  return v.id;
}

describe('an administrator who wants to approve', () => {
  it('cannot make themselves a validator through the admin API: 403 with a sentence', async () => {
    session.user = admin;
    const res = await call(userRoute.PATCH, { method: 'PATCH', body: { role: 'validator' }, params: { id: String(admin.id) } });
    expect(res.status).toBe(403);
    expect(res.body).toMatchObject({ code: 'forbidden:own-role', message: expect.stringMatching(/^You cannot change your own role/) });
  });

  it('made a validator by a second administrator during the review: the audit trail shows it beside the approval', async () => {
    // A role change before a version was drafted is not part of its review.
    const early = await makeUser('viewer');
    await changeRole(secondAdmin, early.id, 'validator');
    const other = await submitted();
    const id = await submitted();
    await changeRole(secondAdmin, admin.id, 'validator');
    const turned = { ...admin, role: 'validator' as const };
    await transition(turned, id, { action: 'start-review' });
    await transition(turned, id, { action: 'approve', comment: 'Fine.' });

    const page = await getVersionPage(analyst, id);
    expect(page.roleChanges).toEqual([
      expect.objectContaining({ person: expect.objectContaining({ id: admin.id }), from: 'admin', to: 'validator', by: secondAdmin.email, approver: true }),
    ]);
    // A reviewer whose role changed before the version existed is not listed.
    await transition({ ...early, role: 'validator' }, other, { action: 'start-review' });
    expect((await getVersionPage(analyst, other)).roleChanges).toEqual([]);
  });
});
