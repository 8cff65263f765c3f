import { z } from 'zod';
import { isIsoDate } from './dates';

/**
 * The filters of the library screen (its address: `/library?segment=&state=&asOf=`): a piece of
 * the segment's name, the state of the segment's entry, and the date at which to read the version
 * in force (the consumer API's as-of rule, lib/assumptions/in-force.ts).
 */
export const libraryStates = ['in-force', 'due-for-review', 'expired', 'in-progress', 'not-published'] as const;
export type LibraryState = (typeof libraryStates)[number];

export const libraryStateLabels: Record<LibraryState, string> = {
  'in-force': 'In force',
  'due-for-review': 'Due for review within 30 days',
  expired: 'Past its review-by date',
  'in-progress': 'A new version in progress',
  'not-published': 'Nothing in force',
};

const blankToUndefined = (v: string | undefined) => (v === undefined || v.trim() === '' ? undefined : v.trim());

export const libraryFiltersSchema = z.object({
  segment: z.string().max(120, 'Keep the segment filter under 120 characters.').optional().transform(blankToUndefined),
  state: z
    .string()
    .optional()
    .transform(blankToUndefined)
    .refine((v) => v === undefined || (libraryStates as readonly string[]).includes(v), 'Choose a state from the list.')
    .transform((v) => v as LibraryState | undefined),
  asOf: z
    .string()
    .optional()
    .transform(blankToUndefined)
    .refine((v) => v === undefined || isIsoDate(v), 'The as-of date must be a calendar date written YYYY-MM-DD.'),
});
export type LibraryFilters = z.output<typeof libraryFiltersSchema>;

/** An entry's health (LibraryEntryDto): overdue is past review-by and still served, expired is no longer served. */
type LibraryHealth = 'ok' | 'expiring' | 'overdue' | 'expired' | 'none';

/** The state an entry of the library is in, for the filter (an entry may be in force and have a version in progress). */
export function entryStates(e: { health: LibraryHealth; pending: unknown }): LibraryState[] {
  const out: LibraryState[] = [];
  // overdue: past review-by but still served, flagged (the overdue policy "flag")
  if (e.health === 'ok' || e.health === 'expiring' || e.health === 'overdue') out.push('in-force');
  if (e.health === 'expiring') out.push('due-for-review');
  if (e.health === 'expired' || e.health === 'overdue') out.push('expired');
  if (e.health === 'none') out.push('not-published');
  if (e.pending) out.push('in-progress');
  return out;
}

/** Whether an entry passes the filters on segment and state (the as-of date is applied when the entry is built). */
export function matchesLibraryFilters(e: { segment: string; health: LibraryHealth; pending: unknown }, f: LibraryFilters): boolean {
  if (f.segment && !e.segment.toLowerCase().includes(f.segment.toLowerCase())) return false;
  if (f.state && !entryStates(e).includes(f.state)) return false;
  return true;
}
