import type { AssumptionStatus, Role } from '@/db/schema';
import { z } from 'zod';
import { AppError } from '@/lib/errors';

/**
 * The maker-checker lifecycle of an assumption version (DESIGN.md, "Assumption lifecycle"), as a
 * pure state machine with its role and person guards. The data access layer calls `planTransition`
 * inside the transaction that writes the new state, so the rules hold whatever the caller.
 *
 *   draft --submit--> submitted --start-review--> in_review --approve--> approved --publish--> published
 *   submitted --withdraw--> draft;  in_review --request-changes--> draft;  in_review --reject--> rejected
 *   published --> superseded (a newer version publishes) | expired (review-by passed) | retired
 */
export const userActions = [
  'submit',
  'withdraw',
  'start-review',
  'request-changes',
  'reject',
  'approve',
  'publish',
  'retire',
] as const;
export type UserAction = (typeof userActions)[number];
/** The body of a person's transition request (POST .../transitions), for assumptions and factor-correlation matrices alike. */
export const transitionBodySchema = z.object({
  action: z.enum(userActions, { message: `The action must be one of: ${userActions.join(', ')}.` }),
  comment: z.string().max(4000, 'A comment has at most 4000 characters.').nullish(),
});

/** Transitions only the system (scheduler) makes. */
export type SystemAction = 'supersede' | 'expire' | 'publish';
export type Action = UserAction | SystemAction | 'draft' | 'edit';

type Rule = { from: readonly AssumptionStatus[]; to: AssumptionStatus; roles: readonly Role[]; commentRequired?: boolean };

export const transitionRules: Record<UserAction, Rule> = {
  submit: { from: ['draft'], to: 'submitted', roles: ['analyst'] },
  withdraw: { from: ['submitted'], to: 'draft', roles: ['analyst'] },
  'start-review': { from: ['submitted'], to: 'in_review', roles: ['validator'] },
  'request-changes': { from: ['in_review'], to: 'draft', roles: ['validator'], commentRequired: true },
  reject: { from: ['in_review'], to: 'rejected', roles: ['validator'], commentRequired: true },
  approve: { from: ['in_review'], to: 'approved', roles: ['validator'], commentRequired: true },
  publish: { from: ['approved'], to: 'published', roles: ['analyst', 'validator', 'admin'] },
  retire: { from: ['published'], to: 'retired', roles: ['validator', 'admin'] },
};

/** Review actions: the person guard (not the maker) applies to these. */
export const reviewActions: readonly UserAction[] = ['start-review', 'request-changes', 'reject', 'approve'];

export const statusLabels: Record<AssumptionStatus, string> = {
  draft: 'draft',
  submitted: 'submitted',
  in_review: 'in review',
  approved: 'approved',
  rejected: 'rejected',
  published: 'published',
  superseded: 'superseded',
  expired: 'expired',
  retired: 'retired',
};

export const actionLabels: Record<UserAction, string> = {
  submit: 'Submit for review',
  withdraw: 'Withdraw',
  'start-review': 'Start review',
  'request-changes': 'Request changes',
  reject: 'Reject',
  approve: 'Approve',
  publish: 'Publish',
  retire: 'Retire',
};

/** Statuses in which a version can still be edited (an edit after submission returns it to draft). */
export const editableStatuses: readonly AssumptionStatus[] = ['draft', 'submitted', 'in_review', 'approved'];
/** Statuses of a version still on its way to publication: at most one per assumption. */
export const openStatuses: readonly AssumptionStatus[] = ['draft', 'submitted', 'in_review', 'approved'];

/**
 * The number of the next version of a value (one more than the highest), or a 409 when a version is
 * still open: one version at a time is on its way to publication. `what` names the value in the
 * sentence ("Prime auto loans", "the matrix of A, B"), `label` writes a status.
 *
 * @example nextVersionNumber([{ version: 1, status: 'published' }], 'Prime auto loans', (s) => s) // 2
 */
export function nextVersionNumber(existing: readonly { version: number; status: AssumptionStatus }[], what: string, label: (s: AssumptionStatus) => string): number {
  const open = existing.find((e) => openStatuses.includes(e.status));
  if (open) {
    throw new AppError('conflict:open-version', `Version ${open.version} of ${what} is still ${label(open.status)}: finish or withdraw it before drafting another.`);
  }
  return existing.reduce((m, e) => Math.max(m, e.version), 0) + 1;
}

export type TransitionContext = {
  actor: { id: number; role: Role };
  status: AssumptionStatus;
  /** The drafter and everyone who edited the version. */
  makerIds: readonly number[];
  comment?: string | null;
  effectiveDate: string;
  /** Today's date (YYYY-MM-DD, UTC). */
  today: string;
  /** The day the version was approved (YYYY-MM-DD, UTC), once it has been. */
  approvedOn?: string | null;
  /**
   * Whether the scheduler is running (a worker's heartbeat is fresh). It publishes an approved
   * version on its effective date by itself, so a person is offered Publish only while it is not.
   */
  schedulerRunning?: boolean;
};

/**
 * Back-dating: a version may not take effect before the day it is approved. Were it allowed, an
 * answer the consumer API gave for a past date could change after the fact (DESIGN.md: "an effective
 * date is never before the approval date, so an as-of answer, once given, never changes").
 * Returns the sentence of refusal, or null.
 */
export function backDatingProblem(effectiveDate: string, approvalDate: string, when: 'approve' | 'publish'): string | null {
  if (effectiveDate >= approvalDate) return null;
  return when === 'approve'
    ? `The effective date ${effectiveDate} is before today, ${approvalDate}: a version cannot take effect before it is approved, or answers already given for past dates would change. Edit the effective date to ${approvalDate} or later, then approve.`
    : `The effective date ${effectiveDate} is before the approval date ${approvalDate}: a version cannot take effect before it was approved. Edit the effective date (which returns the version to draft) and have it approved again.`;
}

/** Refusals that the screen leaves to the server's sentence rather than hiding the button. */
const explainedOnAttempt = new Set(['conflict:approve:back-dated', 'conflict:publish:back-dated']);

/**
 * Decides a user's transition or throws an AppError that says why not:
 * `forbidden:*` (403) for a role or person not allowed, `conflict:*` (409) for a state that does not
 * allow it (a back-dated effective date included), `invalid:comment` (422) for a missing required
 * comment. The role is checked first so that an administrator learns they cannot approve whatever
 * the state.
 */
export function planTransition(action: UserAction, ctx: TransitionContext): { from: AssumptionStatus; to: AssumptionStatus } {
  const rule = transitionRules[action];
  const { actor, status } = ctx;
  if (!rule.roles.includes(actor.role)) {
    throw new AppError(`forbidden:${action}`, roleRefusal(action, actor.role));
  }
  if (!rule.from.includes(status)) {
    throw new AppError(
      `conflict:${action}`,
      `A ${statusLabels[status]} version cannot be ${pastTense(action)}: only a ${rule.from.map((s) => statusLabels[s]).join(' or ')} version can.` +
        (status === 'published' || status === 'superseded' || status === 'expired' || status === 'retired' || status === 'rejected'
          ? ' Draft a new version instead.'
          : ''),
    );
  }
  if (reviewActions.includes(action) && ctx.makerIds.includes(actor.id)) {
    throw new AppError(
      `forbidden:${action}:maker`,
      'You drafted or edited this version, so you cannot review it: another validator must (maker-checker).',
    );
  }
  if (rule.commentRequired && !ctx.comment?.trim()) {
    throw new AppError('invalid:comment', commentRefusal(action), { field: 'comment' });
  }
  if (action === 'approve') {
    const problem = backDatingProblem(ctx.effectiveDate, ctx.today, 'approve');
    if (problem) throw new AppError('conflict:approve:back-dated', problem);
  }
  if (action === 'publish' && ctx.approvedOn) {
    const problem = backDatingProblem(ctx.effectiveDate, ctx.approvedOn, 'publish');
    if (problem) throw new AppError('conflict:publish:back-dated', problem);
  }
  if (action === 'publish' && ctx.effectiveDate > ctx.today) {
    throw new AppError(
      'conflict:publish:not-yet-effective',
      `This version becomes effective on ${ctx.effectiveDate}; it is published on that date, not before.`,
    );
  }
  return { from: status, to: rule.to };
}

function commentRefusal(action: UserAction): string {
  if (action === 'approve') return "Write your conclusion when you approve a version (what you checked and why it holds): a comment is required.";
  return `Say why when you ${action === 'reject' ? 'reject a version' : 'request changes'}: a comment is required.`;
}

function roleRefusal(action: UserAction, role: Role): string {
  if (action === 'approve' && role === 'admin') return 'An administrator cannot approve assumptions: only a validator who did not draft or edit the version can.';
  if (action === 'submit' || action === 'withdraw') return `Only analysts draft, submit and withdraw assumptions; your role is ${role}.`;
  if (reviewActions.includes(action)) return `Only validators review assumptions; your role is ${role}.`;
  if (action === 'retire') return `Only validators and administrators retire published assumptions; your role is ${role}.`;
  return `Your role (${role}) cannot ${action} assumptions.`;
}

function pastTense(action: UserAction): string {
  switch (action) {
    case 'submit':
      return 'submitted';
    case 'withdraw':
      return 'withdrawn';
    case 'start-review':
      return 'taken into review';
    case 'request-changes':
      return 'sent back for changes';
    case 'reject':
      return 'rejected';
    case 'approve':
      return 'approved';
    case 'publish':
      return 'published';
    case 'retire':
      return 'retired';
  }
}

/** The refusals for an edit: who may edit and in which states. */
export function planEdit(ctx: { actor: { role: Role }; status: AssumptionStatus }): { from: AssumptionStatus; to: AssumptionStatus } {
  if (ctx.actor.role !== 'analyst') {
    throw new AppError('forbidden:edit', `Only analysts edit assumption drafts; your role is ${ctx.actor.role}.`);
  }
  if (!editableStatuses.includes(ctx.status)) {
    throw new AppError(
      'conflict:edit',
      ctx.status === 'rejected'
        ? 'A rejected version cannot be edited: draft a new version instead.'
        : `A ${statusLabels[ctx.status]} version is immutable: a correction is a new version.`,
    );
  }
  return { from: ctx.status, to: 'draft' };
}

/**
 * The actions a person could take now (for buttons); the server still decides. An action refused
 * only for a back-dated effective date stays offered, so that the person reads the server's
 * sentence saying what to change. Publish is offered only where a person's action is needed: while
 * the scheduler runs, it publishes an approved version on its effective date by itself.
 */
export function availableActions(ctx: Omit<TransitionContext, 'comment'>): UserAction[] {
  return userActions.filter((a) => {
    if (a === 'publish' && ctx.schedulerRunning !== false) return false;
    try {
      planTransition(a, { ...ctx, comment: 'x' });
      return true;
    } catch (err) {
      return err instanceof AppError && explainedOnAttempt.has(err.code);
    }
  });
}
