import { eq } from 'drizzle-orm';
import { getDb } from '@/db/connection';
import { users, type Role } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { hashPassword } from '@/lib/auth/password';

let counter = 0;

/** Inserts a user straight into the test database and returns them as the DAL sees a user. */
export async function makeUser(role: Role, opts: { password?: string; active?: boolean; email?: string } = {}): Promise<SessionUser> {
  counter += 1;
  const email = opts.email ?? `${role}-${Date.now().toString(36)}-${counter}@test.example`;
  const [res] = await getDb()
    .insert(users)
    .values({
      email,
      name: `Test ${role} ${counter}`,
      role,
      passwordHash: await hashPassword(opts.password ?? 'correct horse battery'),
      active: opts.active ?? true,
    });
  const [row] = await getDb().select().from(users).where(eq(users.id, res.insertId));
  return { id: row.id, email: row.email, name: row.name, role: row.role };
}
