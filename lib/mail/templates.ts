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

/** The other e-mails (findings, evidence, consuming models), rendered by their own functions below. */
export const otherMailKinds = [
  'finding-recorded',
  'finding-due-soon',
  'finding-overdue',
  'evidence-aged',
  'review-overdue',
  'review-withdrawn',
  'model-notice',
] as const;
export type OtherMailKind = (typeof otherMailKinds)[number];

export type Message = { subject: string; body: string };

export type MailFacts = {
  segment: string;
  version: number;
  /** The value to use; null for a factor-correlation matrix (its value is a matrix, on its page). */
  finalValue: number | null;
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
  const value = f.finalValue === null ? null : rho(f.finalValue);
  const comment = f.comment?.trim() ? `\n\nComment:\n${f.comment.trim()}` : '';
  const link = `\n\nOpen it: ${f.url}`;
  switch (kind) {
    case 'awaiting-review':
      return {
        subject: `Awaiting review: correlation assumption ${what}`,
        body: `${f.actorName ?? 'An analyst'} submitted ${what} (${value === null ? '' : `final value ${value}, `}effective ${f.effectiveDate}) for review. It is in the Queue of every validator who did not draft or edit it; any of them may take it into review.${link}${footer}`,
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
        subject: value === null ? `Published: ${what}` : `Published: ${what} = ${value}`,
        body: `${what} is published${value === null ? '' : ` with the value ${value}`}, effective ${f.effectiveDate}, to be reviewed by ${f.reviewBy}. The previous published version${value === null ? ' of the same segments' : ' of the segment'}, if any, is superseded.${link}${footer}`,
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

/** What a message about a validation finding says of it. */
export type FindingMailFacts = {
  id: number;
  title: string;
  severity: string;
  status: string;
  dueDate: string;
  /** What the finding is on, in words ("SME term loans v3", "fit 12", "dataset 4 “Cohorts 2024”"). */
  target: string;
  recordedBy?: string;
  /** Whole days from today to the due date (negative when past). */
  daysLeft?: number;
  url: string;
};

const findingFooter =
  "\n\n--\nRhobook. A high-severity finding blocks approval until a validator closes it or accepts it with a rationale.\nYou receive this as the finding's owner or as the validator who recorded it.";

export function renderFindingMail(kind: 'finding-recorded' | 'finding-due-soon' | 'finding-overdue', f: FindingMailFacts): Message {
  const what = `finding ${f.id} “${f.title}” (${f.severity}) on ${f.target}`;
  const link = `\n\nOpen it: ${f.url}`;
  switch (kind) {
    case 'finding-recorded':
      return {
        subject: `Finding recorded (${f.severity}): ${f.title}`,
        body: `${f.recordedBy ?? 'A validator'} recorded ${what} and made you its owner. It is due on ${f.dueDate}.${link}${findingFooter}`,
      };
    case 'finding-due-soon':
      return {
        subject: `Finding due ${f.daysLeft !== undefined ? dueIn(f.daysLeft) : 'soon'}: ${f.title}`,
        body: `${what} is ${f.status} and due on ${f.dueDate}${f.daysLeft !== undefined ? ` (${dueIn(f.daysLeft)})` : ''}. Report its remediation, or ask the validator to accept it with a rationale.${link}${findingFooter}`,
      };
    case 'finding-overdue':
      return {
        subject: `Finding overdue: ${f.title}`,
        body: `${what} was due on ${f.dueDate}${f.daysLeft !== undefined ? ` (${-f.daysLeft} day${f.daysLeft === -1 ? '' : 's'} ago)` : ''} and is still ${f.status}.${link}${findingFooter}`,
      };
  }
}

/** The evidence behind a published value has aged (a superseded dataset, or later years in a newer one). */
export function renderEvidenceMail(f: { segment: string; version: number; caution: string; backtest: boolean; url: string }): Message {
  const what = `${f.segment} v${f.version}`;
  return {
    subject: `Evidence has aged: ${what}`,
    body: `${f.caution}${f.backtest ? ' The worker backtests the published value on the new years; the result is shown beside the flag on the version page.' : ''}\n\nDraft a new version from a fit of the newer data, or record why the value still holds.\n\nOpen it: ${f.url}${footer}`,
  };
}

/** A published value is past its review-by date: the escalation to validators and administrators. */
export function renderOverdueMail(
  kind: 'review-overdue' | 'review-withdrawn',
  f: { segment: string; version: number; reviewBy: string; url: string },
): Message {
  const what = `${f.segment} v${f.version}`;
  return kind === 'review-overdue'
    ? {
        subject: `Past review-by, still served: ${what}`,
        body: `${what} was due for review by ${f.reviewBy} and no reviewed version has replaced it. Under the institution's overdue policy it stays readable in the consumer API, flagged overdue. Review it and publish a new version, or retire it.\n\nOpen it: ${f.url}${footer}`,
      }
    : {
        subject: `Withdrawn past review-by: ${what}`,
        body: `${what} was due for review by ${f.reviewBy} and no reviewed version has replaced it. Under the institution's overdue policy it is withdrawn: the consumer API no longer serves it as the value in force. Review it and publish a new version.\n\nOpen it: ${f.url}${footer}`,
      };
}

/** The events a consuming model is told of (by e-mail to its contact, and by webhook where it has one). */
export const modelEvents = ['assumption.published', 'assumption.superseded', 'assumption.overdue', 'assumption.withdrawn', 'assumption.retired'] as const;
export type ModelEvent = (typeof modelEvents)[number];

/** What a consuming model's contact reads about an event of an assumption the model uses. */
export function renderModelMail(
  event: ModelEvent,
  f: { model: string; segment: string; version: number; value: number; pd: number; effectiveDate: string; reviewBy: string; supersededBy?: number | null; url: string },
): Message {
  const what = `${f.segment} v${f.version}`;
  const value = `${Number(f.value.toFixed(6))} (with the PD ${Number(f.pd.toFixed(6))})`;
  const lead = `Your model “${f.model}” uses the correlation assumption of ${f.segment}.`;
  const link = `\n\nOpen it: ${f.url}`;
  const tail = `\n\n--\nRhobook. You receive this as the contact of a model registered as using this assumption. Approval in Rhobook is neither an independent validation nor a regulator's approval.`;
  switch (event) {
    case 'assumption.published':
      return { subject: `Published for ${f.model}: ${what} = ${Number(f.value.toFixed(6))}`, body: `${lead} Version ${f.version} is now the published value: ${value}, effective ${f.effectiveDate}, to be reviewed by ${f.reviewBy}.${link}${tail}` };
    case 'assumption.superseded':
      return {
        subject: `Superseded for ${f.model}: ${what}`,
        body: `${lead} Version ${f.version} (${value}) is superseded${f.supersededBy ? ` by version ${f.supersededBy}` : ''}: read the new published value before your next run.${link}${tail}`,
      };
    case 'assumption.overdue':
      return {
        subject: `Overdue for ${f.model}: ${what}`,
        body: `${lead} Version ${f.version} (${value}) is past its review-by date, ${f.reviewBy}. Under the institution's overdue policy it stays readable, flagged overdue, until a reviewed version replaces it.${link}${tail}`,
      };
    case 'assumption.withdrawn':
      return {
        subject: `Withdrawn for ${f.model}: ${what}`,
        body: `${lead} Version ${f.version} (${value}) was due for review by ${f.reviewBy} and is withdrawn under the institution's overdue policy: the consumer API no longer serves a value in force for ${f.segment}.${link}${tail}`,
      };
    case 'assumption.retired':
      return { subject: `Retired for ${f.model}: ${what}`, body: `${lead} Version ${f.version} (${value}) is retired: no value of ${f.segment} is in force any more.${link}${tail}` };
  }
}
