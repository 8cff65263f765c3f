import { describeSpans, isMixed, mixedDefinitionCaution, type DefinitionSpan } from '@/lib/ingest/default-definition';

/** The definition of default of each fitted segment over the fit's years, with the caution of a mix. */
export function FitDefaultDefinitions({ definitions }: { definitions: { segment: string; spans: DefinitionSpan[] }[] }) {
  if (!definitions.length) return null;
  const mixed = definitions.filter((d) => isMixed(d.spans));
  return (
    <section className="space-y-2" aria-label="Definition of default" data-testid="fit-default-definitions">
      <p className="text-sm">
        <span className="font-medium">Definition of default:</span>{' '}
        {definitions.length === 1 || new Set(definitions.map((d) => describeSpans(d.spans))).size === 1
          ? (describeSpans(definitions[0].spans) ?? 'not stated in the data')
          : definitions.map((d) => `${d.segment}: ${describeSpans(d.spans) ?? 'not stated'}`).join(' · ')}
      </p>
      {mixed.map((d) => (
        <p key={d.segment} className="notice-caution text-sm" data-testid="mixed-definition-caution">
          {d.segment}: {mixedDefinitionCaution(d.spans)}
        </p>
      ))}
    </section>
  );
}
