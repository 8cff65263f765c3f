import { describe, expect, it } from 'vitest';
import { defaultRateChart, niceTicks, profileChart } from '@/lib/reports/charts';
import type { ReportDocument } from '@/lib/reports/document';
import { renderReportPdf } from '@/lib/reports/pdf';
import { pdfText } from '../../support/pdf-text';

// The PDF is read back with pdf.js (tests/support/pdf-text.ts), a reader independent of pdfkit.
const longRows = Array.from({ length: 120 }, (_, i) => [String(2000 + i), `${1000 + i}`, `${i % 17}`, `Row ${i}: a long note that wraps across the width of its column`]);

const report: ReportDocument = {
  kind: 'Fit report',
  title: 'Fit 7: SME term loans ρ',
  subtitle: 'Dataset 3 “Annual cohorts”',
  reproduce: [
    ['Engine version', '2.0.0'],
    ['Seeds', 'bootstrap 7; audit 11'],
  ],
  sections: [
    { heading: 'Data', blocks: [{ kind: 'kv', rows: [['Definition of default', '90 days past due (2010-2019)']] }] },
    {
      heading: 'A table across pages',
      blocks: [{ kind: 'table', caption: 'Many rows', columns: ['Year', 'Obligors', 'Defaults', 'Note'], rows: longRows, align: ['left', 'right', 'right', 'left'] }],
    },
    {
      heading: 'Charts',
      blocks: [
        { kind: 'chart', chart: defaultRateChart([{ period: '2010', dr: 0.01 }, { period: '2011', dr: 0.03 }], { q005: 0.002, q025: 0.004, q50: 0.012, q975: 0.03, q995: 0.04 }) },
        { kind: 'chart', chart: profileChart([{ rho: 0, logLik: -10 }, { rho: 0.05, logLik: -8 }, { rho: 0.1, logLik: -9 }], -9.92, 0.05, { lower: 0.01, upper: 0.12, level: 0.95 })! },
      ],
    },
    { heading: 'Cautions', blocks: [{ kind: 'list', tone: 'caution', items: ['The Gaussian one-factor model has no tail dependence.'] }] },
  ],
  methodUrl: 'http://127.0.0.1:3000/method',
  engineVersion: '2.0.0',
  generatedAt: '2026-12-03T10:00:00.000Z',
  fileBase: 'x',
};

describe('the review pack as a PDF', () => {
  it('carries its text (Greek and typographic quotes too), a footer with the engine and the method on every page, and tables over pages with their header', async () => {
    const pdf = await renderReportPdf(report);
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const { pages, text, info } = await pdfText(pdf);
    expect(pages.length).toBeGreaterThanOrEqual(3);
    expect(text).toContain('Fit 7: SME term loans ρ');
    expect(text).toContain('Dataset 3 “Annual cohorts”');
    expect(text).toContain('90 days past due (2010-2019)');
    expect(text).toContain('Row 119: a long note');
    for (const [i, p] of pages.entries()) expect(p).toContain(`engine 2.0.0 · method: http://127.0.0.1:3000/method · page ${i + 1} of ${pages.length}`);
    // The table's header is repeated on the pages it continues on.
    expect(pages.filter((p) => p.includes('Year Obligors Defaults Note')).length).toBeGreaterThanOrEqual(2);
    expect(info.Title).toBe('Fit report: Fit 7: SME term loans ρ');
  });

  it('round chart ticks: 1, 2 or 5 times a power of ten', () => {
    expect(niceTicks(0, 0.043, 4)).toEqual([0, 0.02, 0.04]); // steps of at least (0.043 - 0) / 4
    expect(niceTicks(0, 0.043, 8)).toEqual([0, 0.01, 0.02, 0.03, 0.04]);
    expect(niceTicks(-7.3, 0, 4)).toEqual([-6, -4, -2, 0]);
    expect(niceTicks(0, 1, 5)).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
  });
});
