import { describe, expect, it } from 'vitest';
import { GAUSS_WEIGHTS, KRONROD_NODES, KRONROD_WEIGHTS, quadpackError } from '@/lib/stats/gauss-kronrod';

describe('Gauss-Kronrod G10/K21 constants', () => {
  it('integrate polynomials exactly to their degree (K21: 31, G10: 19)', () => {
    // Kronrod (1965); QUADPACK qk21 (Piessens et al. 1983): exactness degrees 3n+1 and 2n-1.
    for (let j = 0; j <= 31; j++) {
      let k = 0;
      let g = 0;
      for (let i = 0; i < 21; i++) {
        k += KRONROD_WEIGHTS[i] * KRONROD_NODES[i] ** j;
        g += GAUSS_WEIGHTS[i] * KRONROD_NODES[i] ** j;
      }
      const exact = j % 2 === 0 ? 2 / (j + 1) : 0;
      expect(Math.abs(k - exact)).toBeLessThan(1e-15);
      if (j <= 19) expect(Math.abs(g - exact)).toBeLessThan(1e-15);
    }
    // A&S Table 25.4 (n = 10): largest node 0.973906528517172, weight 0.066671344308688
    expect(KRONROD_NODES[19]).toBeCloseTo(0.973906528517172, 15);
    expect(GAUSS_WEIGHTS[19]).toBeCloseTo(0.066671344308688, 15);
  });
});

describe('quadpackError', () => {
  it('follows qk21: resasc min(1, (200 |K - G| / resasc)^1.5), floored at 50 eps K', () => {
    // QUADPACK qk21 (Piessens et al. 1983), the abserr formula
    expect(quadpackError(1, 1 + 1e-6, 0.5)).toBeCloseTo(0.5 * Math.pow((200 * 1e-6) / 0.5, 1.5), 15);
    expect(quadpackError(1, 1 + 1, 0.5)).toBe(0.5); // capped at resasc
    expect(quadpackError(2, 2, 0.5)).toBe(50 * Number.EPSILON * 2); // rounding floor
  });
});
