import type { Role } from '@/db/schema';

declare module 'next-auth' {
  interface Session {
    user: { id: number; role: Role; name?: string | null; email?: string | null; image?: string | null };
  }
}

declare module 'next-auth/jwt' {
  interface JWT {
    uid?: number;
    role?: Role;
  }
}
