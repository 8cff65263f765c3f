import type { Role } from '@/db/schema';

/**
 * What each role may do (DESIGN.md, "Who uses it"). The data access layer checks these on every
 * read and write; pages only use them to decide what to show.
 */
export const permissions = {
  'overview:read': ['viewer', 'analyst', 'validator', 'admin'],
  'users:manage': ['admin'],
  'tokens:manage': ['admin'],
  'outbox:read': ['admin'],
  /** institution-wide settings such as the overdue policy */
  'settings:manage': ['admin'],
  'datasets:read': ['viewer', 'analyst', 'validator', 'admin'],
  'datasets:upload': ['analyst', 'admin'],
  /** waive warnings, supersede, delete (the DAL lets analysts delete only their own uploads) */
  'datasets:manage': ['analyst', 'admin'],
  'segments:manage': ['analyst', 'admin'],
  'fits:read': ['viewer', 'analyst', 'validator', 'admin'],
  'fits:run': ['analyst', 'validator'],
  'assumptions:read': ['viewer', 'analyst', 'validator', 'admin'],
  'assumptions:draft': ['analyst'],
  'assumptions:review': ['validator'],
  'assumptions:publish': ['analyst', 'validator', 'admin'],
  'assumptions:retire': ['validator', 'admin'],
  'findings:read': ['viewer', 'analyst', 'validator', 'admin'],
  /** record a finding, close it or accept it with a rationale (owners report progress: lib/findings/rules.ts) */
  'findings:record': ['validator'],
  'findings:comment': ['analyst', 'validator'],
  'models:read': ['viewer', 'analyst', 'validator', 'admin'],
  /** the register of consuming models: register, change, tie assumptions, webhook secrets */
  'models:manage': ['analyst', 'admin'],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof permissions;

export function can(role: Role, permission: Permission): boolean {
  return (permissions[permission] as readonly Role[]).includes(role);
}

export const roleLabels: Record<Role, string> = {
  viewer: 'Viewer',
  analyst: 'Analyst',
  validator: 'Validator',
  admin: 'Administrator',
};

export const roleDescriptions: Record<Role, string> = {
  viewer: 'Reads published assumptions, their lineage and cautions; pulls values by API or CSV.',
  analyst: 'Uploads loan performance data, runs fits and drafts correlation assumptions.',
  validator: 'Reviews fits and drafts, requests changes, rejects or approves what others drafted.',
  admin: 'Manages users, roles and API tokens. Cannot approve assumptions.',
};
