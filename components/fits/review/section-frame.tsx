import type { ReviewContext, ReviewSection } from './types';

/** A review section as a panel with its heading; the side index links to its id. */
export function SectionFrame({ section, ctx }: { section: ReviewSection; ctx: ReviewContext }) {
  const id = `${ctx.idPrefix}-${section.id}`;
  const { Component } = section;
  return (
    <section id={id} className="panel scroll-mt-4 p-4" aria-labelledby={`${id}-heading`} data-testid={`section-${section.id}`}>
      <h2 id={`${id}-heading`} className="mb-2 text-lg">
        {section.title}
      </h2>
      <Component {...ctx} />
    </section>
  );
}
