import type { Role } from '@/db/schema';

/**
 * The screens in the main navigation. Add an entry when a screen exists (never before): the shell
 * shows the entries whose roles include the signed-in user's role.
 */
export type NavItem = {
  href: string;
  label: string;
  roles: readonly Role[];
  /** Shown only while mail is captured locally (no SMTP_URL): the outbox of the capture server. */
  whenMailCaptured?: boolean;
};

const everyone = ['viewer', 'analyst', 'validator', 'admin'] as const;

export const navItems: NavItem[] = [
  { href: '/', label: 'Overview', roles: everyone },
  { href: '/data', label: 'Data', roles: everyone },
  { href: '/fits', label: 'Fits', roles: everyone },
  { href: '/library', label: 'Library', roles: everyone },
  { href: '/queue', label: 'Queue', roles: ['analyst', 'validator'] },
  { href: '/findings', label: 'Findings', roles: everyone },
  { href: '/models', label: 'Models', roles: everyone },
  { href: '/pairs', label: 'Pair explorer', roles: everyone },
  { href: '/method', label: 'Method', roles: everyone },
  { href: '/admin', label: 'Admin', roles: ['admin'] },
  { href: '/admin/tokens', label: 'API tokens', roles: ['admin'] },
  { href: '/admin/outbox', label: 'Outbox', roles: ['admin'], whenMailCaptured: true },
];

/** The entries for a role; `mailCaptured` is true when no SMTP_URL is set (lib/dal/outbox.ts mailIsCaptured). */
export function navFor(role: Role, mailCaptured: boolean): NavItem[] {
  return navItems.filter((i) => i.roles.includes(role) && (!i.whenMailCaptured || mailCaptured));
}

/**
 * The entry to highlight for a path: among the hrefs that match it (the path itself or a path
 * below it; '/' only matches itself), the LONGEST, so that /admin/tokens highlights "API tokens"
 * and not "Admin" as well. Null when none matches.
 */
export function activeNavHref(hrefs: readonly string[], pathname: string): string | null {
  let best: string | null = null;
  for (const href of hrefs) {
    const hit = href === '/' ? pathname === '/' : pathname === href || pathname.startsWith(href + '/');
    if (hit && (best === null || href.length > best.length)) best = href;
  }
  return best;
}
