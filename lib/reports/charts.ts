import type { Chart } from './document';

/**
 * The review pack's charts as vector primitives (document.ts), the same for the printed page and
 * the PDF: the observed default rates against the fitted Vasicek bands, and the profile
 * likelihood of rho with its interval. Pure geometry: coordinates are computed here, the
 * renderers only draw.
 */
const W = 520;
const H = 230;
const M = { left: 56, right: 14, top: 26, bottom: 38 };
const INK = '#1d2428';
const ACCENT = '#1f5f6b';
const BAND_OUTER = '#e3eff1';
const BAND_INNER = '#c5dde2';

/** About `n` round tick values covering [lo, hi] (1, 2 or 5 times a power of ten apart). */
export function niceTicks(lo: number, hi: number, n = 5): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / Math.max(1, n);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + 1e-9 * step; v += step) out.push(Number(v.toFixed(12)));
  return out;
}

const f = (x: number) => x.toFixed(2);
const line = (pts: [number, number][]) => pts.map(([x, y], i) => `${i ? 'L' : 'M'}${f(x)} ${f(y)}`).join(' ');
const rect = (x0: number, y0: number, x1: number, y1: number) => `M${f(x0)} ${f(y0)} L${f(x1)} ${f(y0)} L${f(x1)} ${f(y1)} L${f(x0)} ${f(y1)} Z`;

function pctLabel(v: number): string {
  if (v === 0) return '0%';
  const p = v * 100;
  return `${p >= 10 ? p.toFixed(0) : p >= 1 ? p.toFixed(1) : p.toFixed(2)}%`;
}

function frame(chart: Chart, yTicks: number[], yOf: (v: number) => number, yLabel: (v: number) => string, axisTitle: string): void {
  const x0 = M.left;
  const x1 = W - M.right;
  for (const t of yTicks) {
    const y = yOf(t);
    chart.paths.push({ d: line([[x0, y], [x1, y]]), stroke: '#dcdcd5', width: 0.5 });
    chart.texts.push({ x: x0 - 6, y: y + 3, text: yLabel(t), anchor: 'end', size: 8 });
  }
  chart.paths.push({ d: line([[x0, M.top], [x0, H - M.bottom], [x1, H - M.bottom]]), stroke: INK, width: 0.8 });
  chart.texts.push({ x: 12, y: (M.top + H - M.bottom) / 2, text: axisTitle, anchor: 'middle', size: 8, rotate: -90 });
}

/**
 * The observed default rate of each period against the fitted default-rate distribution: the
 * 0.5%-99.5% and 2.5%-97.5% bands and the median (the same every year at a fitted (p, rho)).
 */
export function defaultRateChart(
  observed: readonly { period: string; dr: number }[],
  bands: { q005: number; q025: number; q50: number; q975: number; q995: number } | null,
  title = 'Default rate by year, with the fitted bands',
): Chart {
  const chart: Chart = { title, width: W, height: H, paths: [], dots: [], texts: [], description: '' };
  const n = observed.length;
  const top = Math.max(...observed.map((o) => o.dr), bands?.q995 ?? 0, 1e-6) * 1.08;
  const yTicks = niceTicks(0, top, 5);
  const yMax = Math.max(top, yTicks[yTicks.length - 1]);
  const yOf = (v: number) => H - M.bottom - (v / yMax) * (H - M.top - M.bottom);
  const xOf = (i: number) => M.left + (n <= 1 ? (W - M.left - M.right) / 2 : (i / (n - 1)) * (W - M.left - M.right - 8) + 4);
  if (bands) {
    chart.paths.push({ d: rect(M.left, yOf(bands.q995), W - M.right, yOf(bands.q005)), fill: BAND_OUTER });
    chart.paths.push({ d: rect(M.left, yOf(bands.q975), W - M.right, yOf(bands.q025)), fill: BAND_INNER });
    chart.paths.push({ d: line([[M.left, yOf(bands.q50)], [W - M.right, yOf(bands.q50)]]), stroke: ACCENT, width: 0.8, dash: [3, 2] });
  }
  frame(chart, yTicks, yOf, pctLabel, 'default rate');
  if (n) {
    chart.paths.push({ d: line(observed.map((o, i) => [xOf(i), yOf(o.dr)])), stroke: INK, width: 1.2 });
    observed.forEach((o, i) => chart.dots.push({ x: xOf(i), y: yOf(o.dr), r: 2.2, fill: INK }));
    const every = Math.max(1, Math.ceil(n / 12));
    observed.forEach((o, i) => {
      // Every k-th year and the last one, without crowding the last label.
      if ((i % every === 0 && n - 1 - i >= every) || i === n - 1) chart.texts.push({ x: xOf(i), y: H - M.bottom + 14, text: o.period, anchor: 'middle', size: 8 });
    });
  }
  chart.texts.push({ x: (M.left + W - M.right) / 2, y: H - 6, text: 'year', anchor: 'middle', size: 8 });
  chart.texts.push({ x: M.left, y: 14, text: bands ? 'shaded: fitted 95% and 99% bands; dashed: fitted median' : 'no fitted bands (no likelihood estimate, or rho = 0)', anchor: 'start', size: 8 });
  const above = bands ? observed.filter((o) => o.dr > bands.q975).map((o) => o.period) : [];
  chart.description = `Observed default rates of ${n} years from ${observed[0]?.period ?? '—'} to ${observed[n - 1]?.period ?? '—'}, between ${pctLabel(
    Math.min(...observed.map((o) => o.dr)),
  )} and ${pctLabel(Math.max(...observed.map((o) => o.dr)))}${bands ? `; the fitted 95% band is ${pctLabel(bands.q025)} to ${pctLabel(bands.q975)}${above.length ? `, exceeded in ${above.join(', ')}` : ', exceeded in no year'}` : ''}.`;
  return chart;
}

/** The profile log-likelihood of rho (relative to its maximum) with the interval's cut-off and ends. */
export function profileChart(
  curve: readonly { rho: number; logLik: number }[],
  cutoff: number | null,
  estimate: number | null,
  interval: { lower: number; upper: number; level: number } | null,
): Chart | null {
  if (curve.length < 2 || cutoff === null) return null;
  const chart: Chart = { title: 'Profile likelihood of rho', width: W, height: H, paths: [], dots: [], texts: [], description: '' };
  const max = Math.max(...curve.map((c) => c.logLik));
  const drop = max - cutoff;
  const lowest = Math.max(Math.min(...curve.map((c) => c.logLik - max)), -4 * drop);
  const yTicks = niceTicks(lowest, 0, 4);
  const yMin = Math.min(lowest, yTicks[0]);
  const rhoMax = Math.max(...curve.map((c) => c.rho));
  const xTicks = niceTicks(0, rhoMax, 5);
  const xMax = Math.max(rhoMax, xTicks[xTicks.length - 1]);
  const xOf = (r: number) => M.left + (r / xMax) * (W - M.left - M.right);
  const yOf = (v: number) => M.top + ((0 - Math.max(v, yMin)) / (0 - yMin)) * (H - M.top - M.bottom);
  if (interval) chart.paths.push({ d: rect(xOf(interval.lower), M.top, xOf(interval.upper), H - M.bottom), fill: BAND_OUTER });
  frame(chart, yTicks, yOf, (v) => v.toFixed(Math.abs(v) < 10 ? 1 : 0), 'log-likelihood − maximum');
  for (const t of xTicks) chart.texts.push({ x: xOf(t), y: H - M.bottom + 14, text: t.toFixed(2), anchor: 'middle', size: 8 });
  // Points below the lowest tick are left out rather than drawn flat along the axis.
  const shown = curve.filter((c) => c.logLik - max >= yMin);
  chart.paths.push({ d: line(shown.map((c) => [xOf(c.rho), yOf(c.logLik - max)])), stroke: INK, width: 1.2 });
  chart.paths.push({ d: line([[M.left, yOf(cutoff - max)], [W - M.right, yOf(cutoff - max)]]), stroke: '#9b2a22', width: 0.8, dash: [4, 2] });
  if (estimate !== null) chart.paths.push({ d: line([[xOf(estimate), M.top], [xOf(estimate), H - M.bottom]]), stroke: ACCENT, width: 0.8, dash: [2, 2] });
  chart.texts.push({ x: (M.left + W - M.right) / 2, y: H - 6, text: 'rho', anchor: 'middle', size: 8 });
  chart.texts.push({ x: M.left, y: 14, text: `dashed red: the cut-off (drop ${drop.toFixed(4)}); shaded: the ${interval ? `${(interval.level * 100).toFixed(0)}% ` : ''}profile interval`, anchor: 'start', size: 8 });
  chart.description = `The profile log-likelihood of rho on ${curve.length} points from 0 to ${rhoMax.toFixed(3)}, highest at ${estimate === null ? '—' : estimate.toFixed(4)}${
    interval ? `; it stays above the cut-off from ${interval.lower.toFixed(4)} to ${interval.upper.toFixed(4)}` : ''
  }.`;
  return chart;
}
