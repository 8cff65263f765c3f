import { assumptionCautions } from '@/lib/assumptions/cautions';

export function Cautions() {
  return (
    <section className="notice-caution text-sm" aria-label="Cautions">
      <strong>Read these values with care.</strong>
      <ul className="mt-1 list-disc pl-5">
        {assumptionCautions.map((c) => (
          <li key={c}>{c}</li>
        ))}
      </ul>
    </section>
  );
}
