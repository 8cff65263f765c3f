import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { PosteriorSection } from '@/components/fits/portfolio-review';
import { REVIEW_SECTIONS } from '@/components/fits/review/sections';
import { parseEnv } from '@/lib/env';
import type { FitSegmentResult } from '@/lib/fits/results';
import { LOW_DEFAULT_THRESHOLD, posteriorBlock } from '@/lib/stats/low-default';

const panel = { obligors: [800, 820, 790, 810, 850, 830], defaults: [1, 3, 0, 4, 2, 1] }; // 11 defaults
const posterior = posteriorBlock(panel, { kind: 'flat' }, { assetClass: null, level: 0.95 });
const seg = {
  segment: 'Low-default book',
  observed: panel.defaults.map((d, t) => ({ period: String(2011 + t), obligors: panel.obligors[t], defaults: d })),
  posterior,
  estimates: {}, // a stored segment always has its estimates (none are needed here)
} as unknown as FitSegmentResult;
const applying = (threshold: number) =>
  REVIEW_SECTIONS.filter((s) => !s.applies || s.applies({ seg, idPrefix: 'x', bootstrapRequested: false, lowDefaultThreshold: threshold })).map((s) => s.id);

describe('the low-default threshold (setting LOW_DEFAULT_THRESHOLD)', () => {
  it('is 20 total defaults unless set, and a bad value is refused naming the variable', () => {
    // the issue's default (20 defaults in total); lib/env.ts keeps it equal to lib/stats' constant
    expect(parseEnv({}).LOW_DEFAULT_THRESHOLD).toBe(20);
    expect(LOW_DEFAULT_THRESHOLD).toBe(20);
    expect(parseEnv({ LOW_DEFAULT_THRESHOLD: '8' }).LOW_DEFAULT_THRESHOLD).toBe(8);
    expect(() => parseEnv({ LOW_DEFAULT_THRESHOLD: '0' })).toThrow(/LOW_DEFAULT_THRESHOLD: LOW_DEFAULT_THRESHOLD must be at least 1/);
    expect(() => parseEnv({ LOW_DEFAULT_THRESHOLD: 'many' })).toThrow(/LOW_DEFAULT_THRESHOLD: .*whole number/);
    expect(() => parseEnv({ LOW_DEFAULT_THRESHOLD: '2.5' })).toThrow(/LOW_DEFAULT_THRESHOLD: .*whole number/);
  });

  it('puts the posterior first in the review below the setting and after the likelihood sections at or above it', () => {
    const below = applying(20); // 11 < 20
    expect(below[0]).toBe('posterior-first');
    expect(below).not.toContain('posterior');
    const above = applying(11); // 11 is not below 11
    expect(above).not.toContain('posterior-first');
    expect(above.indexOf('posterior')).toBeGreaterThan(above.indexOf('estimates'));
  });

  it('names the setting on the review, whether or not the posterior leads', () => {
    const html = (setting: number) => renderToStaticMarkup(createElement(PosteriorSection, { posterior, totalDefaults: 11, setting }));
    expect(html(20)).toContain('data-testid="low-default-notice"');
    expect(html(20)).toMatch(/fewer than 20, the setting LOW_DEFAULT_THRESHOLD/);
    expect(html(5)).not.toContain('low-default-notice');
    expect(html(5)).toMatch(/below 5 \(the setting LOW_DEFAULT_THRESHOLD\) the posterior would/);
  });
});
