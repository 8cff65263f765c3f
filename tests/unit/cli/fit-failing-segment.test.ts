import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it, vi } from 'vitest';
import type { FitDocument } from '@/lib/cli/document';

/**
 * One segment whose fit fails inside the engine does not sink the file. The upload and the CLI's
 * own reading refuse every input the engine cannot fit (cohorts above 1e9 obligors, counts that are
 * not whole), so an engine failure can no longer be provoked through a valid file: the engine is
 * made to fail on segment "Huge" here, as a numerical failure would, and the CLI's handling of it is
 * what is tested. Panels A and B are fixture panels (binomialMle rho 0.037091 and 0.06262, computed
 * with SciPy 1.17 by tests/fixtures/engine/make_fixtures.py).
 */
vi.mock('@/lib/engine', async (importOriginal) => {
  const actual = await importOriginal<typeof import('@/lib/engine')>();
  return {
    ...actual,
    fitPanelParallel: (async (panel, options, run) => {
      if (panel.segment === 'Huge') throw new RangeError('binomialMle: the integral failed at rho = 0.995 (not finite).');
      return actual.fitPanelParallel(panel, options, run);
    }) as typeof actual.fitPanelParallel,
  };
});

const { main } = await import('@/lib/cli');
const CSV = path.resolve(import.meta.dirname, '../../fixtures/cli/panels-ab.csv');

describe('cli fit: one failing segment does not sink the file', () => {
  it('fits the other segments, reports the failed one in its place and exits with 3', async () => {
    const base = readFileSync(CSV, 'utf8').trim().split('\n');
    const rows = [base[0], ...base.slice(1).filter((l) => l.startsWith('Panel A'))];
    for (let y = 2001; y <= 2010; y++) rows.push(`Huge,${y},1000,${10 + (y % 3)}`);
    rows.push(...base.slice(1).filter((l) => l.startsWith('Panel B')));
    const dir = mkdtempSync(path.join(tmpdir(), 'rhobook-cli-'));
    const file = path.join(dir, 'failing.csv');
    writeFileSync(file, rows.join('\n') + '\n');
    const out: string[] = [];
    const err: string[] = [];
    const code = await main(['fit', file, '--json', '--models', 'independent'], { out: (t) => out.push(t), err: (t) => err.push(t) });
    expect(code).toBe(3);
    const doc = JSON.parse(out.join('\n')) as FitDocument;
    expect(doc.segments.map((s) => s.segment)).toEqual(['Panel A', 'Panel B']);
    expect(doc.segments[0].estimates.binomialMle.rho).toBeCloseTo(0.037091, 5);
    expect(doc.failures).toHaveLength(1);
    expect(doc.failures[0]).toMatchObject({ segment: 'Huge', status: 'failed', position: 1 });
    expect(doc.failures[0].reason).toMatch(/integral failed at rho = 0\.995/);
    expect(err.join('\n')).toMatch(/segment "Huge" was not fitted/);
    const table: string[] = [];
    expect(await main(['fit', file, '--models', 'independent'], { out: (t) => table.push(t), err: () => undefined })).toBe(3);
    expect(table.join('\n')).toMatch(/Segment Panel A[\s\S]*Segment Huge: FAILED, not fitted[\s\S]*Segment Panel B/);
  });

  it('refuses a cohort above the engine range when reading the file, naming the line (exit 2)', async () => {
    const base = readFileSync(CSV, 'utf8').trim().split('\n');
    const rows = [base[0], 'Huge,2001,2000000000,20000000', ...base.slice(1)];
    const dir = mkdtempSync(path.join(tmpdir(), 'rhobook-cli-'));
    const file = path.join(dir, 'huge.csv');
    writeFileSync(file, rows.join('\n') + '\n');
    const err: string[] = [];
    const code = await main(['fit', file, '--json'], { out: () => undefined, err: (t) => err.push(t) });
    expect(code).toBe(2);
    expect(err.join('\n')).toMatch(/line 2, column obligors: 2000000000 obligors is more than the engine handles/);
  });
});
