import Link from 'next/link';
import { segmentHref, segmentsInOrder, type FitResults } from '@/lib/fits/results';

/** Previous and next segment of the same fit, and where this one stands among them. */
export function SegmentPager({ fitId, results, current }: { fitId: number; results: FitResults; current: string }) {
  const names = segmentsInOrder(results).map((i) => (i.kind === 'fit' ? i.fit.segment : i.failure.segment));
  const at = names.indexOf(current);
  if (names.length < 2 || at < 0) return null;
  const prev = at > 0 ? names[at - 1] : null;
  const next = at < names.length - 1 ? names[at + 1] : null;
  return (
    <nav aria-label="Other segments of this fit" className="flex flex-wrap items-center gap-x-4 gap-y-1 text-sm">
      <span className="text-[var(--color-muted)]">
        Segment {at + 1} of {names.length}
      </span>
      {prev ? (
        <Link href={segmentHref(fitId, prev)} rel="prev">
          ← {prev}
        </Link>
      ) : null}
      {next ? (
        <Link href={segmentHref(fitId, next)} rel="next">
          {next} →
        </Link>
      ) : null}
      <Link href={`/fits/${fitId}`}>All segments</Link>
    </nav>
  );
}
