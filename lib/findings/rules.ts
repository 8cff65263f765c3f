import { z } from 'zod';
import { findingSeverities, findingStatuses, findingTargets, type FindingSeverity, type FindingStatus, type Role } from '@/db/schema';
import { isIsoDate } from '@/lib/assumptions/dates';
import { AppError } from '@/lib/errors';

/**
 * Validation findings as rules, without the database: what a finding is, who may move it to which
 * status, and which findings block an approval. The data access layer (lib/dal/findings.ts) calls
 * these inside the transaction that writes the change.
 *
 * Validators record findings and may set any status (closing and accepting are their decisions;
 * accepting needs a rationale). The owner of a finding reports progress: in remediation and
 * remediated. A finding is unresolved until a validator closes it or accepts it.
 */
export const unresolvedStatuses: readonly FindingStatus[] = ['open', 'in_remediation', 'remediated'];

export const findingStatusLabels: Record<FindingStatus, string> = {
  open: 'open',
  in_remediation: 'in remediation',
  remediated: 'remediated',
  accepted: 'accepted with rationale',
  closed: 'closed',
};

export const findingTargetLabels: Record<(typeof findingTargets)[number], string> = { fit: 'fit', dataset: 'dataset', version: 'assumption version' };

/** The moves between statuses (a reopened finding is open again). */
const moves: Record<FindingStatus, readonly FindingStatus[]> = {
  open: ['in_remediation', 'remediated', 'accepted', 'closed'],
  in_remediation: ['open', 'remediated', 'accepted', 'closed'],
  remediated: ['open', 'in_remediation', 'accepted', 'closed'],
  accepted: ['open'],
  closed: ['open'],
};

/** What an owner who is not a validator may report. */
const ownerMoves: readonly FindingStatus[] = ['in_remediation', 'remediated'];

export function isUnresolved(status: FindingStatus): boolean {
  return unresolvedStatuses.includes(status);
}

/**
 * Decides a status change or throws an AppError saying why not: 403 for a person who may not make
 * it, 409 for a move the status does not allow, 422 for an acceptance without a rationale.
 */
export function planFindingChange(ctx: {
  actor: { id: number; role: Role };
  finding: { status: FindingStatus; ownerId: number };
  to: FindingStatus;
  comment?: string | null;
}): { from: FindingStatus; to: FindingStatus } {
  const { actor, finding, to } = ctx;
  const validator = actor.role === 'validator';
  const owner = actor.id === finding.ownerId;
  if (!validator && !(owner && ownerMoves.includes(to))) {
    throw new AppError(
      'forbidden:finding-status',
      owner
        ? `As the finding's owner you report progress (in remediation, remediated); a validator decides whether it is ${findingStatusLabels[to]}.`
        : "Only validators and the finding's owner change its status.",
    );
  }
  if (finding.status === to) throw new AppError('conflict:finding-status', `The finding is already ${findingStatusLabels[to]}.`);
  if (!moves[finding.status].includes(to)) {
    throw new AppError(
      'conflict:finding-status',
      `A finding that is ${findingStatusLabels[finding.status]} cannot become ${findingStatusLabels[to]}: reopen it first.`,
    );
  }
  if (to === 'accepted' && !ctx.comment?.trim()) {
    throw new AppError('invalid:finding', 'Give the rationale for accepting the finding: why the institution takes this risk knowingly.', { field: 'comment' });
  }
  return { from: finding.status, to };
}

export const findingInputSchema = z.object({
  targetType: z.enum(findingTargets, { message: 'A finding is recorded on a fit, a dataset or an assumption version.' }),
  targetId: z.coerce.number().int().positive('Name the fit, dataset or version the finding is on.'),
  title: z.string().trim().min(3, 'Give the finding a title of at least 3 characters.').max(200, 'Keep the title under 200 characters.'),
  description: z
    .string()
    .trim()
    .min(10, 'Describe the finding in at least 10 characters: what is wrong and what is expected.')
    .max(8000, 'Keep the description under 8,000 characters.'),
  severity: z.enum(findingSeverities, { message: 'Choose the severity: high, medium or low.' }),
  ownerId: z.coerce.number().int().positive('Choose the owner who remediates the finding.'),
  dueDate: z.string().refine(isIsoDate, 'The due date must be a calendar date written YYYY-MM-DD.'),
});
export type FindingInput = z.input<typeof findingInputSchema>;

export const findingChangeSchema = z
  .object({
    status: z.enum(findingStatuses, { message: `The status must be one of: ${findingStatuses.join(', ')}.` }).optional(),
    comment: z.string().trim().max(8000, 'Keep the comment under 8,000 characters.').optional(),
  })
  .refine((v) => v.status !== undefined || !!v.comment, { message: 'Write a comment or choose a new status.', path: ['comment'] });
export type FindingChangeInput = z.input<typeof findingChangeSchema>;

/** Severity order for lists: high first. */
export const severityRank: Record<FindingSeverity, number> = { high: 0, medium: 1, low: 2 };
