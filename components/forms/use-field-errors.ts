'use client';

import { useEffect, useMemo, useRef } from 'react';
import { placeErrors, type FormFieldRef, type FormProblem } from '@/lib/forms/place-errors';

/**
 * The errors of a form beside its fields: `error(id)` is the sentence for a field's element (for
 * FormField), `formMessage` what to say at the form (FormMessage). When a new problem arrives the
 * first marked field takes the focus, so a keyboard or screen-reader user lands on it.
 */
export function useFieldErrors(problem: FormProblem, fields: readonly FormFieldRef[]) {
  const placed = useMemo(() => placeErrors(problem, fields), [problem, fields]);
  const focusedFor = useRef<FormProblem>(null);
  useEffect(() => {
    if (!problem || focusedFor.current === problem) return;
    focusedFor.current = problem;
    const first = placed.order[0];
    if (first) document.getElementById(first)?.focus();
  }, [problem, placed]);
  return {
    error: (id: string): string | undefined => placed.byId[id],
    formMessage: placed.formMessage,
  };
}
