import type { Role } from '@/db/schema';

declare module 'next-auth' {
  interface Session {
    user: { id: number; role: Role; sessionVersion: number; name?: string | null; email?: string | null; image?: string | null };
  }
}

declare module 'next-auth/jwt' {
  interface JWT {
    uid?: number;
    role?: Role;
    /** users.session_version when the session began (lib/auth/session.ts refuses an older one). */
    sv?: number;
    /** The account signed in with a one-time password that must be changed first (proxy.ts sends every page to /account). */
    mcp?: boolean;
  }
}
