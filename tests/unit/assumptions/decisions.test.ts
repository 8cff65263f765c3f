import { describe, expect, it } from 'vitest';
import { availableActions, planTransition } from '@/lib/assumptions/lifecycle';
import { publicationNote } from '@/lib/assumptions/publication';
import { AppError } from '@/lib/errors';

// Source: DESIGN.md, "Assumption lifecycle": every decision carries a comment (approve included);
// the scheduler publishes an approved version on its effective date.
const validator = { id: 2, role: 'validator' as const };
const base = { makerIds: [1], effectiveDate: '2026-03-01', today: '2026-03-01' };

function refusal(fn: () => unknown): AppError {
  try {
    fn();
  } catch (err) {
    if (err instanceof AppError) return err;
    throw err;
  }
  throw new Error('expected a refusal');
}

describe('decisions that say what they do', () => {
  it('approve needs the validator’s conclusion: no comment, or only spaces, is refused naming the comment field', () => {
    for (const comment of [undefined, null, '', '   \n']) {
      const e = refusal(() => planTransition('approve', { ...base, actor: validator, status: 'in_review', comment }));
      expect(e.code).toBe('invalid:comment');
      expect(e.status).toBe(422);
      expect(e.message).toMatch(/conclusion/);
      expect(e.details?.field).toBe('comment');
    }
    expect(planTransition('approve', { ...base, actor: validator, status: 'in_review', comment: 'Checked the profile interval.' })).toEqual({
      from: 'in_review',
      to: 'approved',
    });
  });

  it('Publish is offered only while no scheduler runs; the scheduler publishes otherwise', () => {
    const ctx = { ...base, actor: validator, status: 'approved' as const, approvedOn: '2026-02-27' };
    expect(availableActions({ ...ctx, schedulerRunning: true })).not.toContain('publish');
    expect(availableActions(ctx)).not.toContain('publish');
    expect(availableActions({ ...ctx, schedulerRunning: false })).toContain('publish');
    // Not before the effective date, scheduler or not.
    expect(availableActions({ ...ctx, effectiveDate: '2026-03-02', schedulerRunning: false })).not.toContain('publish');
  });
});

describe('when a version publishes, in a sentence', () => {
  const v = { effectiveDate: '2026-03-10', decidedAt: null, publishedAt: null };
  it('before approval it names the effective date as the publication date', () => {
    const n = publicationNote({ ...v, status: 'in_review' }, '2026-03-01', true)!;
    expect(n.kind).toBe('before-approval');
    expect(n.text).toContain('publishes on 2026-03-10');
  });
  it('a draft whose effective date has passed must be edited before approval', () => {
    const n = publicationNote({ ...v, status: 'submitted' }, '2026-03-11', true)!;
    expect(n.kind).toBe('refused');
    expect(n.text).toContain('2026-03-11 or later');
  });
  it('after approval: scheduled, due, or waiting for a person when no scheduler runs', () => {
    const approved = { ...v, status: 'approved' as const, decidedAt: '2026-03-02T10:00:00.000Z' };
    expect(publicationNote(approved, '2026-03-05', true)!.text).toBe('Approved: publishes on 2026-03-10 by the scheduler. Nobody needs to act.');
    expect(publicationNote(approved, '2026-03-10', true)!.kind).toBe('due');
    expect(publicationNote(approved, '2026-03-10', false)!.kind).toBe('waiting');
  });
  it('a back-dated approved version is not published and says so', () => {
    const n = publicationNote({ ...v, status: 'approved', decidedAt: '2026-03-12T10:00:00.000Z' }, '2026-03-12', true)!;
    expect(n.kind).toBe('refused');
    expect(n.text).toMatch(/^Not published: The effective date 2026-03-10 is before the approval date 2026-03-12/);
  });
  it('a published version names the day it was published', () => {
    const n = publicationNote({ ...v, status: 'superseded', decidedAt: '2026-03-02T10:00:00.000Z', publishedAt: '2026-03-10T00:05:00.000Z' }, '2026-04-01', true)!;
    expect(n).toEqual({ kind: 'published', date: '2026-03-10', text: 'Published on 2026-03-10 (effective date 2026-03-10).' });
  });
});
