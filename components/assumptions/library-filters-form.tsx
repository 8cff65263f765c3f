import Link from 'next/link';
import { FormField } from '@/components/forms/form-field';
import { libraryStateLabels, libraryStates } from '@/lib/assumptions/library-filters';

/**
 * The library's filters as a plain GET form (the filters live in the address, so a filtered view
 * can be bookmarked and shared): a piece of the segment's name, the state, the as-of date. Errors
 * come from the page's parse of the address and are shown at their fields; the first invalid one
 * takes the focus.
 */
export function LibraryFiltersForm({
  values,
  errors,
  segments,
}: {
  values: { segment?: string; state?: string; asOf?: string };
  errors: Record<string, string>;
  segments: string[];
}) {
  const first = ['segment', 'state', 'asOf'].find((k) => errors[k]);
  const active = !!(values.segment || values.state || values.asOf);
  return (
    <form method="get" action="/library" className="panel grid gap-3 p-4 sm:grid-cols-[1fr_1fr_1fr_auto] sm:items-start" aria-label="Filter the library" noValidate>
      <FormField id="filter-segment" label="Segment (name contains)" error={errors.segment}>
        {(a) => <input {...a} name="segment" className="field" list="library-segments" defaultValue={values.segment ?? ''} autoFocus={first === 'segment'} />}
      </FormField>
      <datalist id="library-segments">
        {segments.map((s) => (
          <option key={s} value={s} />
        ))}
      </datalist>
      <FormField id="filter-state" label="State" error={errors.state}>
        {(a) => (
          <select {...a} name="state" className="field" defaultValue={values.state ?? ''} autoFocus={first === 'state'}>
            <option value="">Any</option>
            {libraryStates.map((s) => (
              <option key={s} value={s}>
                {libraryStateLabels[s]}
              </option>
            ))}
          </select>
        )}
      </FormField>
      <FormField id="filter-as-of" label="In force on (as-of date; empty: today)" error={errors.asOf}>
        {(a) => <input {...a} name="asOf" type="date" className="field" defaultValue={values.asOf ?? ''} autoFocus={first === 'asOf'} />}
      </FormField>
      <div className="flex gap-2 sm:mt-6">
        <button type="submit" className="btn">
          Filter
        </button>
        {active ? (
          <Link className="btn btn-quiet no-underline" href="/library">
            Clear
          </Link>
        ) : null}
      </div>
    </form>
  );
}
