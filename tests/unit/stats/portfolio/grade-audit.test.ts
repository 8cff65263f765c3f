import { describe, expect, it } from 'vitest';
import { gradeAuditRange, mergeGradeAudit } from '@/lib/stats/grade-audit';

const spec = {
  obligors: [Array(12).fill(3000), Array(12).fill(2000), Array(12).fill(1500)],
  pds: [0.005, 0.015, 0.04],
  rho: 0.1,
  seed: 77,
};

describe('grade audit (coverage of the common-rho interval at the user\'s n_gt and T)', () => {
  it('gives the same replications for any split of the index range', () => {
    // reproducibility by construction: replication r draws from deriveSeed(seed, r)
    const whole = gradeAuditRange(spec, 0, 6);
    const split = [...gradeAuditRange(spec, 3, 6), ...gradeAuditRange(spec, 0, 3)];
    expect(mergeGradeAudit([split], spec)).toEqual(mergeGradeAudit([whole], spec));
  });

  it('covers the truth about as often as the level says (seeded Monte Carlo, tolerance 3 Monte Carlo standard errors)', () => {
    // Wilks (1938): the profile interval is asymptotically exact; R = 60 gives an MCSE of about 0.03
    const summary = mergeGradeAudit([gradeAuditRange(spec, 0, 60)], spec);
    expect(summary.defined).toBeGreaterThan(55);
    expect(Math.abs(summary.coverage! - 0.95)).toBeLessThan(3 * Math.sqrt((0.95 * 0.05) / 60));
    expect(Math.abs(summary.bias!)).toBeLessThan(4 * summary.sd! / Math.sqrt(summary.defined));
  });

  it('refuses a missing replication and a bad spec with a sentence', () => {
    expect(() => mergeGradeAudit([gradeAuditRange(spec, 1, 2)], spec)).toThrow(/index 0 is missing/);
    expect(() => gradeAuditRange({ ...spec, pds: [0.01] }, 0, 1)).toThrow(/one row of cohort sizes per grade/);
  });
});
