import Link from 'next/link';

/** The models that use an assumption: who is affected by a change of its value. */
export function ModelsUsing({ models }: { models: { id: number; name: string; ownerName: string; intendedUse: string; webhook: boolean; active: boolean }[] }) {
  return (
    <section className="panel p-5" aria-labelledby="impact-heading" data-testid="models-using">
      <h2 id="impact-heading" className="mb-2">
        Models that use this assumption
      </h2>
      {models.length === 0 ? (
        <p className="text-sm text-[var(--color-muted)]">
          No consuming model is registered as using it. <Link href="/models">Register one</Link> so that its owner hears of every change.
        </p>
      ) : (
        <>
          <p className="mb-2 text-sm text-[var(--color-muted)]">A publication, supersession, overdue value or retirement is told to each by e-mail and, where registered, by a signed webhook.</p>
          <ul className="space-y-1 text-sm">
            {models.map((m) => (
              <li key={m.id}>
                <Link href={`/models/${m.id}`}>{m.name}</Link> <span className="text-[var(--color-muted)]">({m.ownerName}{m.webhook ? '; webhook' : ''}{m.active ? '' : '; inactive'})</span>: {m.intendedUse}
              </li>
            ))}
          </ul>
        </>
      )}
    </section>
  );
}
