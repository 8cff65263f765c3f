import { describe, expect, it } from 'vitest';
import { findSegment, segmentHref, segmentsInOrder, type FitResults, type FitSegmentResult } from '@/lib/fits/results';

const seg = (name: string) => ({ segment: name }) as unknown as FitSegmentResult;

describe('a fit run\'s segments by page address', () => {
  const results: FitResults = {
    engine: { version: 'x' },
    segments: [seg('SME term loans'), seg('50% LTV / prime')],
    failures: [{ segment: 'Broken', position: 1, reason: 'No periods.' }] as FitResults['failures'],
  };

  it('finds a segment by its name, raw or percent-encoded, and a failed one as a failure', () => {
    expect(findSegment(results, 'SME term loans')).toMatchObject({ index: 0 });
    expect(findSegment(results, 'SME%20term%20loans')).toMatchObject({ index: 0 });
    expect(findSegment(results, encodeURIComponent('50% LTV / prime'))).toMatchObject({ index: 1 });
    expect(findSegment(results, '50% LTV / prime')).toMatchObject({ index: 1 });
    expect(findSegment(results, 'Broken')).toEqual({ failure: results.failures![0] });
    expect(findSegment(results, 'Nothing')).toBeNull();
  });

  it('builds addresses that find their segment again', () => {
    for (const s of ['SME term loans', '50% LTV / prime']) {
      const last = segmentHref(7, s).split('/').pop()!;
      expect(segmentHref(7, s).startsWith('/fits/7/segments/')).toBe(true);
      expect(findSegment(results, last)).not.toBeNull();
    }
  });

  it('lists fitted and failed segments in the run\'s order', () => {
    expect(segmentsInOrder(results).map((i) => (i.kind === 'fit' ? i.fit.segment : `failed ${i.failure.segment}`))).toEqual([
      'SME term loans',
      'failed Broken',
      '50% LTV / prime',
    ]);
  });
});
