import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { adminAudit, roles, users, type Role } from '@/db/schema';
import { changeRole, createUser, listAdminAudit, listUsers, setUserActive } from '@/lib/dal/users';
import { AppError } from '@/lib/errors';
import type { SessionUser } from '@/lib/auth/guard';
import { makeUser } from '../../support/users';

const actors = {} as Record<Role, SessionUser>;

beforeAll(async () => {
  for (const r of roles) actors[r] = await makeUser(r);
});
afterAll(async () => {
  await closeDb();
});

async function expectCode(p: Promise<unknown>, code: string) {
  await expect(p).rejects.toBeInstanceOf(AppError);
  await p.catch((e: AppError) => expect(e.code).toBe(code));
}

// Every role against every admin action, at the data access layer (not the page).
describe('admin actions by role', () => {
  for (const role of ['viewer', 'analyst', 'validator'] as const) {
    describe(role, () => {
      it('cannot list users', async () => {
        await expectCode(listUsers(actors[role]), 'forbidden:users:manage');
      });
      it('cannot create a user', async () => {
        await expectCode(
          createUser(actors[role], { email: `x-${role}@test.example`, name: 'X', role: 'viewer', password: 'long enough pw' }),
          'forbidden:users:manage',
        );
        const [row] = await getDb().select().from(users).where(eq(users.email, `x-${role}@test.example`));
        expect(row).toBeUndefined();
      });
      it('cannot change a role', async () => {
        await expectCode(changeRole(actors[role], actors.viewer.id, 'admin'), 'forbidden:users:manage');
      });
      it('cannot deactivate a user', async () => {
        await expectCode(setUserActive(actors[role], actors.viewer.id, false), 'forbidden:users:manage');
      });
      it('cannot read the administration log', async () => {
        await expectCode(listAdminAudit(actors[role]), 'forbidden:users:manage');
      });
    });
  }

  describe('admin', () => {
    it('lists users without password hashes', async () => {
      const list = await listUsers(actors.admin);
      expect(list.length).toBeGreaterThanOrEqual(4);
      for (const u of list) expect(Object.keys(u)).not.toContain('passwordHash');
    });

    it('creates a user with a password and writes the audit log', async () => {
      const { user, temporaryPassword } = await createUser(actors.admin, {
        email: 'New.Person@Test.example',
        name: 'New Person',
        role: 'analyst',
        password: 'a long enough password',
      });
      expect(user.email).toBe('new.person@test.example');
      expect(temporaryPassword).toBeNull();
      const log = await listAdminAudit(actors.admin);
      expect(log.find((a) => a.action === 'user.create' && a.targetId === String(user.id))).toBeTruthy();
    });

    it('creates a user by invitation with a one-time password that must be changed', async () => {
      const { user, temporaryPassword } = await createUser(actors.admin, {
        email: 'invitee@test.example',
        name: 'Invitee',
        role: 'viewer',
        mode: 'invitation',
      });
      expect(temporaryPassword).toMatch(/^[A-Za-z0-9]{16}$/);
      expect(user.mustChangePassword).toBe(true);
    });

    it('refuses a duplicate e-mail and a short password with sentences', async () => {
      await expectCode(
        createUser(actors.admin, { email: 'invitee@test.example', name: 'Again', role: 'viewer', password: 'a long enough password' }),
        'conflict:user-exists',
      );
      await expectCode(createUser(actors.admin, { email: 'short@test.example', name: 'Short', role: 'viewer', password: 'short' }), 'invalid:user');
    });

    it('changes a role and deactivates a user, each audited with before and after', async () => {
      const target = await makeUser('viewer');
      const changed = await changeRole(actors.admin, target.id, 'analyst');
      expect(changed.role).toBe('analyst');
      const off = await setUserActive(actors.admin, target.id, false);
      expect(off.active).toBe(false);
      const log = (await listAdminAudit(actors.admin)).filter((a) => a.targetId === String(target.id));
      expect(log.map((a) => a.action).sort()).toEqual(['user.deactivate', 'user.role']);
      const roleEntry = log.find((a) => a.action === 'user.role')!;
      expect(roleEntry.before).toEqual({ role: 'viewer' });
      expect(roleEntry.after).toEqual({ role: 'analyst' });
    });
  });
});

describe('nobody changes their own role', () => {
  it('an administrator making themselves a validator is refused (403, a sentence), and nothing is written', async () => {
    const admin = await makeUser('admin');
    const logBefore = (await listAdminAudit(admin, 500)).length;
    const p = changeRole(admin, admin.id, 'validator');
    await expectCode(p, 'forbidden:own-role');
    await p.catch((e: AppError) => {
      expect(e.status).toBe(403);
      expect(e.message).toBe('You cannot change your own role: another administrator must, so that two people are always involved.');
    });
    const [row] = await getDb().select({ role: users.role }).from(users).where(eq(users.id, admin.id));
    expect(row.role).toBe('admin');
    expect((await listAdminAudit(admin, 500)).length).toBe(logBefore);
  });

  it('another administrator may, and the change is in the administration log with before and after', async () => {
    const first = await makeUser('admin');
    const second = await makeUser('admin');
    await changeRole(second, first.id, 'validator');
    const entry = (await listAdminAudit(second, 500)).find((a) => a.action === 'user.role' && a.targetId === String(first.id));
    expect(entry).toMatchObject({ actorEmail: second.email, before: { role: 'admin' }, after: { role: 'validator' } });
  });
});

describe('the last active administrator', () => {
  it('cannot be demoted or deactivated', async () => {
    // Make the test admin the only active admin.
    await getDb().update(users).set({ active: false }).where(sql`${users.role} = 'admin' AND ${users.id} <> ${actors.admin.id}`);
    await expectCode(setUserActive(actors.admin, actors.admin.id, false), 'conflict:last-admin');
    // With a second active admin, the first can step down.
    const second = await makeUser('admin');
    const demoted = await changeRole(second, actors.admin.id, 'validator');
    expect(demoted.role).toBe('validator');
    await changeRole(second, actors.admin.id, 'admin');
  });
});

describe('the administration log is append-only', () => {
  it('refuses UPDATE and DELETE in the database itself', async () => {
    const [row] = await getDb().select().from(adminAudit).limit(1);
    expect(row).toBeDefined();
    // Drizzle wraps the driver's error; the trigger's message is in its cause.
    const reason = (p: Promise<unknown>) =>
      p.then(
        () => 'succeeded',
        (e: Error & { cause?: Error }) => `${e.message} ${e.cause?.message ?? ''}`,
      );
    expect(await reason(getDb().update(adminAudit).set({ action: 'tampered' }).where(eq(adminAudit.id, row.id)))).toMatch(/append-only/);
    expect(await reason(getDb().delete(adminAudit).where(eq(adminAudit.id, row.id)))).toMatch(/append-only/);
    const [still] = await getDb().select().from(adminAudit).where(eq(adminAudit.id, row.id));
    expect(still.action).toBe(row.action);
  });
});
