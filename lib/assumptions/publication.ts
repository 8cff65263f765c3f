import type { AssumptionStatus } from '@/db/schema';
import { backDatingProblem } from './lifecycle';

/**
 * What the screen says about when a version publishes, before and after approval. The scheduler
 * publishes an approved version on its effective date by itself (lib/dal/assumptions/scheduler.ts),
 * so a person has to act only when no worker runs the scheduler; the sentence says which.
 */
export type PublicationNote = {
  /** before-approval: not yet approved; scheduled: approved, effective date ahead; due: approved and due now;
   * waiting: due but no scheduler runs (a person publishes); refused: back-dated; published: done. */
  kind: 'before-approval' | 'scheduled' | 'due' | 'waiting' | 'refused' | 'published';
  /** The day it publishes or published (YYYY-MM-DD). */
  date: string;
  text: string;
};

export type PublicationFacts = {
  status: AssumptionStatus;
  effectiveDate: string;
  /** ISO time of the approval, once approved. */
  decidedAt: string | null;
  publishedAt: string | null;
};

export function publicationNote(v: PublicationFacts, today: string, schedulerRunning: boolean): PublicationNote | null {
  switch (v.status) {
    case 'draft':
    case 'submitted':
    case 'in_review': {
      if (v.effectiveDate < today) {
        return {
          kind: 'refused',
          date: v.effectiveDate,
          text: `The effective date ${v.effectiveDate} is before today: a version cannot take effect before it is approved. Edit the effective date to ${today} or later before approval.`,
        };
      }
      return {
        kind: 'before-approval',
        date: v.effectiveDate,
        text:
          v.effectiveDate === today
            ? `If approved today, it publishes on ${v.effectiveDate}, at once: the scheduler publishes an approved version on its effective date.`
            : `If approved by then, it publishes on ${v.effectiveDate}: the scheduler publishes an approved version on its effective date, without anyone pressing Publish.`,
      };
    }
    case 'approved': {
      const approvedOn = v.decidedAt ? v.decidedAt.slice(0, 10) : today;
      const problem = backDatingProblem(v.effectiveDate, approvedOn, 'publish');
      if (problem) return { kind: 'refused', date: v.effectiveDate, text: `Not published: ${problem}` };
      if (v.effectiveDate > today) {
        return { kind: 'scheduled', date: v.effectiveDate, text: `Approved: publishes on ${v.effectiveDate} by the scheduler. Nobody needs to act.` };
      }
      return schedulerRunning
        ? { kind: 'due', date: v.effectiveDate, text: `Approved and effective on ${v.effectiveDate}: the scheduler publishes it within a minute. Nobody needs to act.` }
        : {
            kind: 'waiting',
            date: v.effectiveDate,
            text: `Approved and effective since ${v.effectiveDate}, but no worker is running the scheduler: publish it here, or start the worker and it publishes by itself.`,
          };
    }
    case 'published':
    case 'superseded':
    case 'expired':
    case 'retired': {
      if (!v.publishedAt) return null;
      const on = v.publishedAt.slice(0, 10);
      return { kind: 'published', date: on, text: `Published on ${on} (effective date ${v.effectiveDate}).` };
    }
    case 'rejected':
      return null;
  }
}
