import type { Role } from '@/db/schema';

/**
 * The screens in the main navigation. Add an entry when a screen exists (never before): the shell
 * shows the entries whose roles include the signed-in user's role.
 */
export type NavItem = { href: string; label: string; roles: readonly Role[]; devOnly?: boolean };

const everyone = ['viewer', 'analyst', 'validator', 'admin'] as const;

export const navItems: NavItem[] = [
  { href: '/', label: 'Overview', roles: everyone },
  { href: '/data', label: 'Data', roles: everyone },
  { href: '/fits', label: 'Fits', roles: everyone },
  { href: '/library', label: 'Library', roles: everyone },
  { href: '/queue', label: 'Queue', roles: ['analyst', 'validator'] },
  { href: '/pairs', label: 'Pair explorer', roles: everyone },
  { href: '/admin', label: 'Admin', roles: ['admin'] },
  { href: '/admin/tokens', label: 'API tokens', roles: ['admin'] },
  { href: '/admin/outbox', label: 'Outbox', roles: ['admin'], devOnly: true },
];

export function navFor(role: Role, isDev: boolean): NavItem[] {
  return navItems.filter((i) => i.roles.includes(role) && (!i.devOnly || isDev));
}
