import type { Role } from '@/db/schema';
import { AppError } from '@/lib/errors';
import { can, type Permission } from './permissions';

/** The signed-in person as the rest of the application sees them. */
export type SessionUser = { id: number; email: string; name: string; role: Role };

/** Throws `forbidden:<permission>` unless the user's role holds the permission. Used by the DAL. */
export function assertCan(user: SessionUser, permission: Permission, what?: string): void {
  if (!can(user.role, permission)) {
    throw new AppError(
      `forbidden:${permission}`,
      what ?? `Your role (${user.role}) does not allow this. Ask an administrator if you need it.`,
    );
  }
}
