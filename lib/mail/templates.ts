/**
 * The e-mails of the assumption lifecycle: subject and plain-text body for each event, values in
 * the screens' format (lib/format.ts) and the screens' words. Pure: the DAL writes them to the
 * outbox in the same transaction as the transition.
 */
import { DEFERRAL } from '@/lib/assumptions/cautions';
import { rho } from '@/lib/format';

export const mailKinds = [
  'awaiting-review',
  'changes-requested',
  'approved',
  'rejected',
  'published',
  'review-by-30',
  'review-by-7',
] as const;
export type MailKind = (typeof mailKinds)[number];

export type MailFacts = {
  segment: string;
  version: number;
  finalValue: number;
  effectiveDate: string;
  reviewBy: string;
  actorName?: string;
  comment?: string | null;
  /** Reminders: whole days from the day the reminder is written to the review-by date. */
  daysLeft?: number;
  url: string;
};

function dueIn(days: number): string {
  return days <= 0 ? 'today' : days === 1 ? 'in 1 day' : `in ${days} days`;
}

const footer = `\n\n--\nRhobook. Approval in Rhobook is neither an independent validation nor a supervisor's approval. ${DEFERRAL}\nYou receive this because of your role in this assumption.`;

export function renderMail(kind: MailKind, f: MailFacts): { subject: string; body: string } {
  const what = `${f.segment} v${f.version}`;
  const value = rho(f.finalValue);
  const comment = f.comment?.trim() ? `\n\nComment:\n${f.comment.trim()}` : '';
  const link = `\n\nOpen it: ${f.url}`;
  switch (kind) {
    case 'awaiting-review':
      return {
        subject: `Awaiting review: correlation assumption ${what}`,
        body: `${f.actorName ?? 'An analyst'} submitted ${what} (final value ${value}, effective ${f.effectiveDate}) for review. It is in the Queue of every validator who did not draft or edit it; any of them may take it into review.${link}${footer}`,
      };
    case 'changes-requested':
      return {
        subject: `Changes requested: ${what}`,
        body: `${f.actorName ?? 'A validator'} sent ${what} back to draft with a request for changes; it is in your Queue.${comment}${link}${footer}`,
      };
    case 'approved':
      return {
        subject: `Approved: ${what}`,
        body: `${f.actorName ?? 'A validator'} approved ${what}. It publishes on its effective date, ${f.effectiveDate}.${comment}${link}${footer}`,
      };
    case 'rejected':
      return {
        subject: `Rejected: ${what}`,
        body: `${f.actorName ?? 'A validator'} rejected ${what}. A rejected version stays on record; draft a new version to try again.${comment}${link}${footer}`,
      };
    case 'published':
      return {
        subject: `Published: ${what} = ${value}`,
        body: `${what} is published with the value ${value}, effective ${f.effectiveDate}, to be reviewed by ${f.reviewBy}. The previous published version of the segment, if any, is superseded.${link}${footer}`,
      };
    case 'review-by-30':
    case 'review-by-7':
      return {
        // The reminder goes out when the date is 30 (7) days away or closer: say how close it really is.
        subject: `Review due ${f.daysLeft !== undefined ? dueIn(f.daysLeft) : `within ${kind === 'review-by-30' ? 30 : 7} days`}: ${what}`,
        body: `${what} must be reviewed by ${f.reviewBy}${f.daysLeft !== undefined ? ` (${dueIn(f.daysLeft)})` : ''}. After that date it expires and downstream models no longer receive it as the value in force.${link}${footer}`,
      };
  }
}
