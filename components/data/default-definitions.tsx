import { describeSpans, isMixed, type DefinitionSpan } from '@/lib/ingest/default-definition';

/** The definition of default of each segment over its years; a change across the years is marked. */
export function DefaultDefinitions({ uploadField, segments }: { uploadField: string | null; segments: { name: string; definitions: DefinitionSpan[] }[] }) {
  const mixed = segments.filter((s) => isMixed(s.definitions));
  return (
    <div className="space-y-1 text-sm" data-testid="default-definitions">
      <h3>Definition of default</h3>
      {uploadField ? <p>Given at upload: {uploadField}</p> : null}
      <table className="table" aria-label="Definition of default by segment">
        <thead>
          <tr>
            <th scope="col">Segment</th>
            <th scope="col">Definition of default (years)</th>
          </tr>
        </thead>
        <tbody>
          {segments.map((s) => (
            <tr key={s.name}>
              <td>{s.name}</td>
              <td className={isMixed(s.definitions) ? 'font-medium text-[var(--color-caution)]' : ''}>{describeSpans(s.definitions) ?? 'not stated'}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {mixed.length ? (
        <p className="notice-caution">
          The definition of default changes across the years of {mixed.map((s) => s.name).join(', ')}: a fit across the change mixes two kinds of default, and its
          results say so.
        </p>
      ) : null}
      {segments.some((s) => s.definitions.some((d) => d.definition === null)) ? (
        <p className="text-xs text-[var(--color-muted)]">“not stated”: neither the file nor the upload named a definition for those years.</p>
      ) : null}
    </div>
  );
}
