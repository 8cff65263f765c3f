import { describe, expect, it } from 'vitest';
import { nextVersionNumber } from '@/lib/assumptions/lifecycle';
import { queueReason } from '@/lib/assumptions/queue';

const yes = async () => true;
const no = async () => false;
const last = (a: string | null) => async () => a;
const never = async (): Promise<never> => {
  throw new Error('asked without need');
};

describe('queueReason: what awaits a person (maker-checker, DESIGN.md lifecycle)', () => {
  it('validators: a submitted version they did not make, and one in review by them', async () => {
    expect(await queueReason({ status: 'submitted', decisionComment: null }, 'validator', false, never, never)).toBe('Submitted: awaiting review');
    expect(await queueReason({ status: 'in_review', decisionComment: null }, 'validator', false, yes, never)).toBe('In review by you: decide');
    expect(await queueReason({ status: 'in_review', decisionComment: null }, 'validator', false, no, never)).toBeNull();
    // a maker never checks their own version
    expect(await queueReason({ status: 'submitted', decisionComment: null }, 'validator', true, never, never)).toBeNull();
  });

  it('analysts: their own draft sent back with changes requested, with the comment', async () => {
    expect(await queueReason({ status: 'draft', decisionComment: 'Explain the margin.' }, 'analyst', true, never, last('request-changes'))).toBe('Changes requested: Explain the margin.');
    expect(await queueReason({ status: 'draft', decisionComment: null }, 'analyst', true, never, last('edit'))).toBeNull();
    expect(await queueReason({ status: 'draft', decisionComment: null }, 'analyst', false, never, never)).toBeNull();
  });

  it('viewers and administrators have no queue', async () => {
    expect(await queueReason({ status: 'submitted', decisionComment: null }, 'viewer', false, never, never)).toBeNull();
    expect(await queueReason({ status: 'draft', decisionComment: null }, 'admin', true, never, never)).toBeNull();
  });
});

describe('nextVersionNumber: one version at a time on its way to publication (DESIGN.md lifecycle)', () => {
  it('is one more than the highest when none is open', () => {
    expect(nextVersionNumber([], 'A', (s) => s)).toBe(1);
    expect(nextVersionNumber([{ version: 1, status: 'superseded' }, { version: 3, status: 'published' }, { version: 2, status: 'rejected' }], 'A', (s) => s)).toBe(4);
  });

  it('refuses with 409 naming the open version and the value while one is draft, submitted, in review or approved', () => {
    for (const status of ['draft', 'submitted', 'in_review', 'approved'] as const) {
      expect(() => nextVersionNumber([{ version: 1, status: 'published' }, { version: 2, status }], 'Prime auto loans', (s) => s.replace('_', ' '))).toThrow(
        `Version 2 of Prime auto loans is still ${status.replace('_', ' ')}: finish or withdraw it before drafting another.`,
      );
    }
  });
});
