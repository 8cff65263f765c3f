import { describe, expect, it } from 'vitest';
import type { FitSegmentResult } from '@/lib/fits/results';
import type { ReportDocument } from '@/lib/reports/document';
import { mixingLawsSection } from '@/lib/reports/mixing-laws-blocks';
import { renderReportPdf } from '@/lib/reports/pdf';
import { estimatesTable, segmentSections } from '@/lib/reports/segment-blocks';
import { fitPanel } from '@/lib/stats/fit-panel';
import { pdfText } from '../../support/pdf-text';

// A 12-year panel (the betaMle panel of tests/fixtures/copula/make_copula.py: beta a 4.476, b 356.48, logLik -42.649 by SciPy 1.17).
const panel = {
  segment: 'Term loans',
  periods: Array.from({ length: 12 }, (_, i) => String(2010 + i)),
  obligors: [1200, 1350, 1500, 1400, 1300, 1250, 1600, 1700, 1550, 1450, 1380, 1420],
  defaults: [10, 25, 8, 14, 40, 12, 9, 22, 15, 11, 30, 13],
};
const withLaws = { ...fitPanel(panel, { models: ['independent'], mixingLaws: { models: ['t', 'beta', 'logitNormal'] } }), assetClass: 'none', chosen: 'binomialMle', windows: [] } as unknown as FitSegmentResult;
const without = { ...fitPanel(panel, { models: ['independent'] }), assetClass: 'none', chosen: 'binomialMle', windows: [] } as unknown as FitSegmentResult;

describe('the mixing laws in the fit report', () => {
  it('reports the laws in two tables and the test in sentences, the asymptotic p-value never first', () => {
    const s = mixingLawsSection(withLaws, 3)!;
    expect(s.heading).toBe('Mixing laws: the Gaussian copula challenged');
    const [fit, tail, list] = s.blocks.filter((b) => b.kind !== 'list' || b.tone !== 'caution');
    expect(fit.kind === 'table' && fit.rows.map((r) => r[0])).toEqual(['Gaussian copula (probit-normal)', 'Student-t copula', 'Beta mixing', 'Logit-normal mixing']);
    expect(fit.kind === 'table' && fit.caption).toContain('BIC uses the number of years as the sample size');
    // beta mixing's maximum: a 4.476, b 356.5 (computed with SciPy 1.17 by tests/fixtures/copula/make_copula.py)
    expect(fit.kind === 'table' && fit.rows[2][1]).toMatch(/^a 4\.476, b 356\.5, PD /);
    expect(tail.kind === 'table' && tail.columns).toEqual(['Law', '99% rate', '99.9% rate', 'Joint default', 'Default correlation', 'Tail dependence']);
    expect(tail.kind === 'table' && tail.rows[0][5]).toBe('0.0000');
    expect(tail.kind === 'table' && tail.rows[2][5]).toBe('none');
    expect(list.kind).toBe('list');
    const items = list.kind === 'list' ? list.items : [];
    const asymptotic = items.findIndex((x) => x.startsWith('Asymptotic p-value'));
    expect(asymptotic).toBeGreaterThan(0);
    // no bootstrap was asked for in this fit: said, and no p-value leads
    expect(items[asymptotic - 1]).toMatch(/No bootstrap was run, so the test has no p-value that can be relied on here\.$/);
    expect(JSON.stringify(s)).not.toMatch(/NaN|undefined/);
  });

  it("gives each law's probability integral transform year by year, in the review's words", () => {
    const s = mixingLawsSection(withLaws, 3)!;
    const intro = s.blocks.find((b) => b.kind === 'p');
    expect(intro?.kind === 'p' && intro.text).toMatch(/^The probability integral transform \(PIT\) of each year's default count/);
    const table = s.blocks.find((b) => b.kind === 'table' && b.columns[0] === 'Year');
    expect(table?.kind === 'table' && table.columns).toEqual(['Year', 'Defaults', 'Gaussian copula (probit-normal)', 'Student-t copula', 'Beta mixing', 'Logit-normal mixing']);
    expect(table?.kind === 'table' && table.rows.map((r) => r[0])).toEqual(panel.periods);
    expect(table?.kind === 'table' && table.rows[0][1]).toBe('10 of 1,200');
    // the Gaussian column is the diagnostics' mid-PIT (count-pit.ts, checked against SciPy by make_pit.py)
    expect(table?.kind === 'table' && table.rows.map((r) => r[2].slice(0, 5))).toEqual(withLaws.diagnostics.pit!.map((u) => u.toFixed(3)));
    const last = s.blocks.at(-1)!;
    expect(last.kind === 'list' && last.items.filter((x) => x.startsWith('Under ')).length).toBe(4);
  });

  it('leaves the other laws out of the estimates table and adds nothing to a fit that did not run them', () => {
    const table = estimatesTable(withLaws);
    expect(table.kind === 'table' && table.rows.map((r) => r[0])).toEqual((estimatesTable(without) as { rows: string[][] }).rows.map((r) => r[0]));
    expect(mixingLawsSection(without, 3)).toBeNull();
    expect(segmentSections(without).map((s) => s.heading)).not.toContain('Mixing laws: the Gaussian copula challenged');
    expect(segmentSections(withLaws).map((s) => s.heading)).toContain('Mixing laws: the Gaussian copula challenged');
  });

  it('prints in the PDF with its Greek letters and the chi-square subscripts', async () => {
    const report: ReportDocument = {
      kind: 'Fit report',
      title: 'Fit 1',
      subtitle: 'x',
      reproduce: [],
      sections: [mixingLawsSection(withLaws, 2)!],
      methodUrl: 'http://127.0.0.1:3000/method',
      engineVersion: '3.2.0',
      generatedAt: '2026-12-04T10:00:00.000Z',
      fileBase: 'x',
    };
    const { text } = await pdfText(await renderReportPdf(report));
    expect(text).toContain('Mixing laws: the Gaussian copula challenged');
    expect(text).toContain('χ²₀');
    expect(text).toContain('Student-t copula');
  });
});
