import { describe, expect, it } from 'vitest';
import { count, integer, interval, level, pct, pd, plural, pValue, rho, RHO_DECIMALS, seedsText, signed, when } from '@/lib/format';

describe('one format for each number', () => {
  it('writes a PD as a percentage with three significant digits below 1% (common practice in credit reporting)', () => {
    expect(pd(0.0071346)).toBe('0.713%');
    expect(pd(0.00001234)).toBe('0.00123%');
    expect(pd(0.0525)).toBe('5.25%');
    expect(pd(0.25)).toBe('25.00%');
    expect(pd(0)).toBe('0%');
    expect(pd(null)).toBe('—');
    expect(pd(Number.NaN)).toBe('—');
  });

  it('writes every correlation with the same number of decimals, also when the value is round', () => {
    expect(RHO_DECIMALS).toBe(4);
    expect(rho(0.12)).toBe('0.1200');
    expect(rho(0.123456)).toBe('0.1235');
    expect(rho(0)).toBe('0.0000');
    expect(rho(undefined)).toBe('—');
    expect(interval(0.0494, 0.15389)).toBe('[0.0494, 0.1539]');
    expect(interval(0.01, null)).toBe('—');
  });

  it('counts with the right plural and thousands separators (English grammar, from memory)', () => {
    expect(count(1, 'cohort row')).toBe('1 cohort row');
    expect(count(0, 'cohort row')).toBe('0 cohort rows');
    expect(count(18, 'period')).toBe('18 periods');
    expect(count(1234567, 'loan')).toBe('1,234,567 loans');
    expect(count(2, 'was', 'were')).toBe('2 were');
    expect(plural(1, 'warning')).toBe('warning');
    expect(plural(3, 'warning')).toBe('warnings');
    expect(integer(1999.6)).toBe('2,000');
  });

  it('writes signs, p-values, levels and instants plainly', () => {
    expect(signed(0.0123)).toBe('+0.0123');
    expect(signed(-0.004)).toBe('−0.0040');
    expect(pValue(0.0312)).toBe('0.0312');
    expect(pValue(2.5e-7)).toBe('2.5e-7');
    expect(pValue(1e-15)).toBe('below 10⁻¹²');
    expect(level(0.95)).toBe('95%');
    expect(level(0.999)).toBe('99.9%');
    expect(pct(0.5, 2)).toBe('50.0%');
    expect(when('2025-03-04T05:06:07.000Z')).toBe('2025-03-04 05:06 UTC');
    expect(when(null)).toBe('—');
  });
});

describe('seedsText', () => {
  it('writes a fit’s seeds in words, a seed not used as not run (common practice: a result names what reproduces it)', () => {
    expect(seedsText({ bootstrap: 7, audit: null, breakTest: null, mixingLaws: 11 })).toBe('bootstrap 7; simulation study not run; break test not run; copula test 11');
    expect(seedsText({})).toBe('none');
    expect(seedsText(null)).toBe('—');
    expect(seedsText([1, 2])).toBe('[1,2]');
  });
});
