import { CAUTIONS } from '@/lib/assumptions/cautions';

/**
 * The cautions of every correlation (lib/assumptions/cautions.ts), as a list beside the value they
 * qualify. `compact` in smaller type, `columns` in two columns on wide screens.
 */
export function Cautions({ compact = false, columns = false, title = 'Read these values with care.' }: { compact?: boolean; columns?: boolean; title?: string }) {
  return (
    <section className={`notice-caution ${compact ? 'text-xs' : 'text-sm'}`} aria-label="Cautions" data-testid="cautions-list">
      <strong>{title}</strong>
      <ul className={`mt-1 list-disc space-y-0.5 pl-5 ${columns ? 'lg:columns-2 lg:gap-10' : ''}`}>
        {CAUTIONS.map((c) => (
          <li key={c.id}>{c.text}</li>
        ))}
      </ul>
    </section>
  );
}
