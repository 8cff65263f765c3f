import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { z } from 'zod';
import { getDb } from '@/db/client';
import { roles } from '@/db/schema';
import { env } from '@/lib/env';
import { safeRedirectUrl } from './callback-url';
import { parseTrustedProxies, requestClientAddress } from './client-address';
import { endSessions } from './session-version';
import { attemptSignIn } from './sign-in';

const credentialsSchema = z.object({
  email: z.string().trim().min(1).max(254),
  password: z.string().min(1).max(200),
});

/** The client address of a sign-in (lib/auth/client-address.ts: the socket, or a trusted proxy's word). */
function clientAddress(headers: Record<string, unknown> | undefined): string {
  const header = (name: string) => {
    const v = headers?.[name];
    return typeof v === 'string' ? v : Array.isArray(v) ? v.join(', ') : null;
  };
  return requestClientAddress(header, parseTrustedProxies(env().TRUSTED_PROXIES));
}

/** Whether the app's public URL is HTTPS, so that its session cookie must be Secure. */
export function usesHttps(url: string | undefined): boolean {
  return typeof url === 'string' && url.toLowerCase().startsWith('https:');
}

/**
 * next-auth configuration: e-mail and password (bcrypt), JWT sessions carrying the user id and role.
 * The role in the token is only a hint for the interface: lib/auth/session.ts reloads the user on
 * every request, so a deactivated user or a changed role takes effect at once, and a session whose
 * version is older than the account's (signed out, password changed) is refused.
 */
export const authOptions: NextAuthOptions = {
  secret: env().NEXTAUTH_SECRET,
  // Secure cookies (and the __Secure- prefix) whenever the app is served over HTTPS.
  useSecureCookies: usesHttps(env().NEXTAUTH_URL),
  session: { strategy: 'jwt', maxAge: 8 * 60 * 60 },
  pages: { signIn: '/sign-in' },
  providers: [
    CredentialsProvider({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = credentialsSchema.safeParse(credentials ?? {});
        if (!parsed.success) throw new Error('refused');
        const result = await attemptSignIn(getDb(), {
          ...parsed.data,
          clientAddress: clientAddress(req?.headers as Record<string, unknown> | undefined),
        });
        // The thrown message becomes the `error` the sign-in page maps to a sentence.
        if (!result.ok) throw new Error(result.reason === 'rate-limited' ? `rate-limited:${result.waitSeconds}` : result.reason);
        return {
          id: String(result.user.id),
          email: result.user.email,
          name: result.user.name,
          role: result.user.role,
          sessionVersion: result.user.sessionVersion,
          mustChangePassword: result.user.mustChangePassword,
        };
      },
    }),
  ],
  callbacks: {
    // Where next-auth sends a browser after signing in or out: only this application's own paths.
    async redirect({ url, baseUrl }) {
      return safeRedirectUrl(url, baseUrl);
    },
    async jwt({ token, user }) {
      if (user) {
        const u = user as { id: string; role?: string; sessionVersion?: number; mustChangePassword?: boolean };
        token.uid = Number(u.id);
        token.role = z.enum(roles).catch('viewer').parse(u.role);
        token.sv = u.sessionVersion ?? 0;
        token.mcp = u.mustChangePassword === true;
      }
      return token;
    },
    async session({ session, token }) {
      if (session.user) {
        session.user.id = typeof token.uid === 'number' ? token.uid : 0;
        session.user.role = token.role ?? 'viewer';
        // A cookie from before the session version existed counts as version -1: never current.
        session.user.sessionVersion = typeof token.sv === 'number' ? token.sv : -1;
      }
      return session;
    },
  },
  events: {
    // Signing out ends the session on the server too: a copy of the cookie kept elsewhere stops
    // working, because lib/auth/session.ts checks the version on every request.
    async signOut({ token }) {
      if (typeof token?.uid === 'number') await endSessions(getDb(), token.uid);
    },
  },
};
