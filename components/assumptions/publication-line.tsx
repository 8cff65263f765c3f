import type { PublicationNote } from '@/lib/assumptions/publication';

/** When the version publishes or published, in a sentence, under the version's heading. */
export function PublicationLine({ note }: { note: PublicationNote | null }) {
  if (!note) return null;
  const tone = note.kind === 'refused' || note.kind === 'waiting' ? 'notice-caution' : 'text-[var(--color-muted)]';
  return (
    <p className={`mt-1 text-sm ${tone}`} data-testid="publication-note" data-kind={note.kind}>
      {note.text}
    </p>
  );
}
