import { describe, expect, it } from 'vitest';
import { definitionSpans, describeSpans, isMixed, mixedDefinitionCaution } from '@/lib/ingest/default-definition';
import { validateCohortText } from '@/lib/ingest/cohort';
import { expectFinding } from './helpers';

// Source: DESIGN.md "Cautions": a rho is valid only with the PD and the definition of default it was
// fitted on; the column is the optional `default_definition` of a cohort file.
const rows = (defs: (string | null)[], from = 2010) => defs.map((d, i) => ({ period: String(from + i), definition: d }));

describe('spans of a definition of default over the years', () => {
  it('one definition throughout is one span, whatever the order of the rows; spacing and case of white space do not split it', () => {
    const spans = definitionSpans([...rows(['90 dpd', ' 90  dpd', '90 dpd'])].reverse());
    expect(spans).toEqual([{ definition: '90 dpd', from: '2010', to: '2012', periods: ['2010', '2011', '2012'] }]);
    expect(isMixed(spans)).toBe(false);
    expect(describeSpans(spans)).toBe('90 dpd');
    expect(mixedDefinitionCaution(spans)).toBeNull();
  });

  it('a change is two spans; a definition that comes back is a third; the caution names them with their years', () => {
    const spans = definitionSpans(rows(['120 dpd', '120 dpd', '90 dpd', '90 dpd', '120 dpd']));
    expect(spans.map((s) => [s.definition, s.from, s.to])).toEqual([
      ['120 dpd', '2010', '2011'],
      ['90 dpd', '2012', '2013'],
      ['120 dpd', '2014', '2014'],
    ]);
    expect(isMixed(spans)).toBe(true);
    expect(describeSpans(spans)).toBe('120 dpd (2010-2011); 90 dpd (2012-2013); 120 dpd (2014)');
    expect(mixedDefinitionCaution(spans)).toMatch(/^The data behind this value mix definitions of default across the years: 120 dpd \(2010-2011\)/);
  });

  it('rows without a definition are a span of their own ("not stated")', () => {
    const spans = definitionSpans(rows([null, '', '90 dpd']));
    expect(describeSpans(spans)).toBe('not stated (2010-2011); 90 dpd (2012)');
    expect(definitionSpans([])).toEqual([]);
    expect(describeSpans([])).toBeNull();
  });
});

describe('cohort upload: a change of definition is a warning', () => {
  const file = (defs: string[]) =>
    ['segment,period,obligors,defaults,default_definition', ...defs.map((d, i) => `SME,${2010 + i},1000,${10 + i},${d}`)].join('\n') + '\n';

  it('a change across the years of a segment warns on the first row of the new definition, naming both', () => {
    const r = validateCohortText(file(['120 dpd', '120 dpd', '90 dpd', '90 dpd', '90 dpd']));
    expect(r.ok).toBe(true);
    const f = expectFinding(r.findings, 'default-definition-change', 'warning', 4, 'default_definition');
    expect(f.message).toContain('120 dpd (2010-2011); 90 dpd (2012-2014)');
  });

  it('a definition on some rows only warns that the others take the upload field', () => {
    const r = validateCohortText(file(['90 dpd', '', '90 dpd', '90 dpd', '90 dpd']));
    expect(r.findings.some((f) => f.rule === 'default-definition-change')).toBe(false);
    const f = expectFinding(r.findings, 'default-definition-partial', 'warning', 3, 'default_definition');
    expect(f.message).toContain('(2011)');
  });

  it('one definition throughout, or none at all, is no finding', () => {
    for (const defs of [['90 dpd', '90 dpd', '90 dpd', '90 dpd', '90 dpd'], ['', '', '', '', '']]) {
      const r = validateCohortText(file(defs));
      expect(r.findings.filter((f) => f.rule.startsWith('default-definition'))).toEqual([]);
    }
  });
});
