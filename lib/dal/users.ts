import 'server-only';
import { and, asc, count, desc, eq, sql } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '@/db/client';
import type { Tx } from '@/db/connection';
import { adminAudit, roles, users, type Role, type User } from '@/db/schema';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { endSessions } from '@/lib/auth/session-version';
import { generateTemporaryPassword, hashPassword, verifyPassword } from '@/lib/auth/password';
import { normaliseEmail } from '@/lib/auth/sign-in';
import { AppError, parseOrThrow } from '@/lib/errors';
import { recordAdminAction } from './admin-audit';

/** What the admin screen shows of a user: never the password hash. */
export type UserDto = {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  mustChangePassword: boolean;
  createdAt: string;
};

function toDto(u: User): UserDto {
  return {
    id: u.id,
    email: u.email,
    name: u.name,
    role: u.role,
    active: u.active,
    mustChangePassword: u.mustChangePassword,
    createdAt: u.createdAt.toISOString(),
  };
}

export async function listUsers(actor: SessionUser): Promise<UserDto[]> {
  assertCan(actor, 'users:manage', 'Only administrators can see the list of users.');
  const rows = await getDb().select().from(users).orderBy(asc(users.role), asc(users.name));
  return rows.map(toDto);
}

const roleSchema = z.enum(roles, { message: 'Choose a role: viewer, analyst, validator or admin.' });

export const createUserSchema = z
  .object({
    email: z.email('Give a valid e-mail address.').max(254),
    name: z.string().trim().min(1, 'Give the person a name.').max(120),
    role: roleSchema,
    mode: z.enum(['password', 'invitation']).default('password'),
    password: z.string().optional(),
  })
  .superRefine((v, ctx) => {
    if (v.mode === 'password' && (!v.password || v.password.length < 10)) {
      ctx.addIssue({ code: 'custom', path: ['password'], message: 'An initial password needs at least 10 characters.' });
    }
  });
export type CreateUserInput = z.input<typeof createUserSchema>;

/**
 * Creates a user. With `mode: 'invitation'` a one-time password is generated and returned once
 * (to hand over or send); the user must change it at first sign-in.
 */
export async function createUser(
  actor: SessionUser,
  input: CreateUserInput,
): Promise<{ user: UserDto; temporaryPassword: string | null }> {
  assertCan(actor, 'users:manage', 'Only administrators can create users.');
  const v = parseOrThrow(createUserSchema, input, 'invalid:user', 'The user details are not valid.');
  const email = normaliseEmail(v.email);
  const temporaryPassword = v.mode === 'invitation' ? generateTemporaryPassword() : null;
  const passwordHash = await hashPassword(temporaryPassword ?? v.password!);
  const db = getDb();
  return db.transaction(async (tx) => {
    const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.email, email)).limit(1);
    if (existing) throw new AppError('conflict:user-exists', `A user with the e-mail ${email} already exists.`, { field: 'email' });
    const [res] = await tx.insert(users).values({
      email,
      name: v.name,
      role: v.role,
      passwordHash,
      mustChangePassword: temporaryPassword !== null,
    });
    const id = res.insertId;
    const [row] = await tx.select().from(users).where(eq(users.id, id));
    await recordAdminAction(tx, actor, {
      action: 'user.create',
      targetType: 'user',
      targetId: id,
      after: { email, name: v.name, role: v.role, active: true, invitation: temporaryPassword !== null },
    });
    return { user: toDto(row), temporaryPassword };
  });
}

/** Counts active admins other than `exceptId`, locking the rows so two requests cannot race. */
async function otherActiveAdmins(tx: Tx, exceptId: number) {
  const rows = await tx
    .select({ id: users.id })
    .from(users)
    .where(and(eq(users.role, 'admin'), eq(users.active, true)))
    .for('update');
  return rows.filter((r) => r.id !== exceptId).length;
}

/**
 * Changes a user's role, written to the administration log with before and after. Nobody changes
 * their own role, so two people are always involved (an administrator cannot make themselves a
 * validator and approve).
 */
export async function changeRole(actor: SessionUser, userId: number, role: Role): Promise<UserDto> {
  assertCan(actor, 'users:manage', 'Only administrators can change roles.');
  if (userId === actor.id) {
    throw new AppError('forbidden:own-role', 'You cannot change your own role: another administrator must, so that two people are always involved.');
  }
  const newRole = parseOrThrow(roleSchema, role, 'invalid:role');
  return getDb().transaction(async (tx) => {
    const [target] = await tx.select().from(users).where(eq(users.id, userId)).for('update');
    if (!target) throw new AppError('not_found:user', 'There is no such user.');
    if (target.role === newRole) return toDto(target);
    if (target.role === 'admin' && target.active && (await otherActiveAdmins(tx, target.id)) === 0) {
      throw new AppError('conflict:last-admin', 'This is the last active administrator: make someone else an administrator first.');
    }
    await tx.update(users).set({ role: newRole, updatedAt: sql`CURRENT_TIMESTAMP(3)` }).where(eq(users.id, userId));
    await recordAdminAction(tx, actor, {
      action: 'user.role',
      targetType: 'user',
      targetId: userId,
      before: { role: target.role },
      after: { role: newRole },
    });
    return toDto({ ...target, role: newRole });
  });
}

export async function setUserActive(actor: SessionUser, userId: number, active: boolean): Promise<UserDto> {
  assertCan(actor, 'users:manage', 'Only administrators can deactivate or reactivate users.');
  return getDb().transaction(async (tx) => {
    const [target] = await tx.select().from(users).where(eq(users.id, userId)).for('update');
    if (!target) throw new AppError('not_found:user', 'There is no such user.');
    if (target.active === active) return toDto(target);
    if (!active && target.role === 'admin' && (await otherActiveAdmins(tx, target.id)) === 0) {
      throw new AppError('conflict:last-admin', 'This is the last active administrator and cannot be deactivated.');
    }
    await tx.update(users).set({ active, updatedAt: sql`CURRENT_TIMESTAMP(3)` }).where(eq(users.id, userId));
    await recordAdminAction(tx, actor, {
      action: active ? 'user.reactivate' : 'user.deactivate',
      targetType: 'user',
      targetId: userId,
      before: { active: target.active },
      after: { active },
    });
    return toDto({ ...target, active });
  });
}

export type AdminAuditDto = {
  id: number;
  actorEmail: string;
  action: string;
  targetType: string;
  targetId: string;
  before: unknown;
  after: unknown;
  at: string;
};

export async function listAdminAudit(actor: SessionUser, limit = 100): Promise<AdminAuditDto[]> {
  assertCan(actor, 'users:manage', 'Only administrators can read the administration log.');
  const rows = await getDb().select().from(adminAudit).orderBy(desc(adminAudit.id)).limit(Math.min(limit, 500));
  return rows.map((r) => ({
    id: r.id,
    actorEmail: r.actorEmail,
    action: r.action,
    targetType: r.targetType,
    targetId: r.targetId,
    before: r.before,
    after: r.after,
    at: r.at.toISOString(),
  }));
}

/**
 * The signed-in user changes their own password (required after an invitation). The current
 * password is asked for again, so that a session left open is not enough to take the account.
 * Every session of the account ends with the change (the person signs in again with the new one).
 */
export async function changeOwnPassword(actor: SessionUser, input: { currentPassword: string; newPassword: string }): Promise<void> {
  const { currentPassword, newPassword } = input;
  const [row] = await getDb().select({ passwordHash: users.passwordHash, active: users.active }).from(users).where(eq(users.id, actor.id)).limit(1);
  if (!row || !row.active) throw new AppError('unauthorized:session', 'Sign in to continue.');
  if (!(await verifyPassword(currentPassword, row.passwordHash))) {
    throw new AppError('invalid:current-password', 'The current password is not right. Type the password you signed in with.', { field: 'current' });
  }
  if (newPassword.length < 10) throw new AppError('invalid:password', 'A password needs at least 10 characters.', { field: 'password' });
  if (newPassword === currentPassword) throw new AppError('invalid:password', 'Choose a new password that differs from the current one.', { field: 'password' });
  const passwordHash = await hashPassword(newPassword);
  await getDb().transaction(async (tx) => {
    await tx.update(users).set({ passwordHash, mustChangePassword: false, updatedAt: sql`CURRENT_TIMESTAMP(3)` }).where(eq(users.id, actor.id));
    // Every session of the account ends, this one too: whoever else held the old password is out.
    await endSessions(tx, actor.id);
  });
}

/**
 * The first accounts of an empty database (the demo seed). There is no one yet to authorise the
 * call, so it writes only while the users table is empty (checked under a lock in the transaction
 * that inserts) and otherwise returns how many users there are and creates nobody.
 */
export async function createInitialUsers(
  accounts: readonly { email: string; name: string; role: Role }[],
  passwordHash: string,
): Promise<{ created: SessionUser[]; existing: number }> {
  return getDb().transaction(async (tx) => {
    const present = await tx.select({ id: users.id }).from(users).limit(1).for('update');
    if (present.length) {
      const [r] = await tx.select({ n: count() }).from(users);
      return { created: [], existing: r.n };
    }
    await tx.insert(users).values(accounts.map((a) => ({ email: normaliseEmail(a.email), name: a.name, role: a.role, passwordHash })));
    const rows = await tx.select({ id: users.id, email: users.email, name: users.name, role: users.role }).from(users).orderBy(asc(users.id));
    return { created: rows, existing: 0 };
  });
}
