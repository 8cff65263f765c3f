/**
 * The job kinds and their handlers are two static maps (lib/jobs/kinds, workers/handlers) checked
 * against each other by the compiler; these tests hold the parts the compiler cannot see.
 */
import { describe, expect, it } from 'vitest';
import { jobKinds, kindSpec } from '@/lib/jobs/kinds';
import { convertLoansHandler } from '@/workers/handlers/convert-loans';
import { fitHandler } from '@/workers/handlers/fit';
import { handlerFor, jobHandlers, type JobHandlerMap } from '@/workers/handlers';

describe('job kinds', () => {
  it('are keyed by the name stored in jobs.kind', () => {
    for (const [key, spec] of Object.entries(jobKinds)) expect(spec.name).toBe(key);
  });

  it('each have a handler, and nothing else has one', () => {
    expect(Object.keys(jobHandlers).sort()).toEqual(Object.keys(jobKinds).sort());
  });

  it('are found by their stored name only (not by names every object has)', () => {
    expect(kindSpec('fit')).toBe(jobKinds.fit);
    for (const name of ['toString', 'constructor', '__proto__', 'hasOwnProperty', 'nope']) {
      expect(kindSpec(name), name).toBeUndefined();
      expect(handlerFor(name), name).toBeUndefined();
    }
  });

  it('a handler map without a kind does not compile', () => {
    // @ts-expect-error: the convert-loans handler is missing (npm run typecheck fails if this compiles)
    const missing: JobHandlerMap = { fit: fitHandler };
    // @ts-expect-error: the handlers are swapped, so their payload types differ from their kinds'
    const swapped: JobHandlerMap = { fit: convertLoansHandler, 'convert-loans': fitHandler };
    expect(Object.keys(missing)).toEqual(['fit']);
    expect(Object.keys(swapped).length).toBe(2);
  });
});
