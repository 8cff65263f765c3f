import type { AssumptionStatus } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';

/**
 * What a person may see of the library. Everyone with assumptions:read sees every version (drafts
 * included): maker-checker needs the validators and the audit to see drafts; viewers see only what
 * has been published.
 */
export function visibleToViewer(status: AssumptionStatus): boolean {
  return status === 'published' || status === 'superseded' || status === 'expired' || status === 'retired';
}

export function canSeeVersion(actor: SessionUser, status: AssumptionStatus): boolean {
  return actor.role !== 'viewer' || visibleToViewer(status);
}
