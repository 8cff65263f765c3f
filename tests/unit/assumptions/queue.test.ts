import { describe, expect, it } from 'vitest';
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
