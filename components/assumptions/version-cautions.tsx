/** The cautions of this version in particular (mixed definitions of default, aged evidence), beside its value. */
export function VersionCautions({ cautions }: { cautions: string[] }) {
  if (!cautions.length) return null;
  return (
    <section className="notice-caution text-sm" aria-label="Cautions of this version" data-testid="version-cautions">
      <ul className="list-disc space-y-1 pl-5">
        {cautions.map((c) => (
          <li key={c}>{c}</li>
        ))}
      </ul>
    </section>
  );
}
