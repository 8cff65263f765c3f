'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import { waiveWarnings } from '@/lib/client/datasets';
import { problemOf, type FormFieldRef, type FormProblem } from '@/lib/forms/place-errors';

const FIELDS: readonly FormFieldRef[] = [
  ['rule', 'waive-rule'],
  ['reason', 'waive-reason'],
];

/** Waives the warnings of one rule on a dataset, with a reason (kept with the dataset). */
export function WaiveForm({ datasetId, rules }: { datasetId: number; rules: { rule: string; count: number }[] }) {
  const router = useRouter();
  const [rule, setRule] = useState(rules[0]?.rule ?? '');
  const [reason, setReason] = useState('');
  const [done, setDone] = useState<string | null>(null);
  const [problem, setProblem] = useState<FormProblem>(null);
  const [pending, setPending] = useState(false);
  const { error, formMessage } = useFieldErrors(problem, FIELDS);
  if (rules.length === 0) return null;
  return (
    <form
      aria-label="Waive a warning"
      noValidate
      className="grid gap-2 md:grid-cols-[14rem_1fr_auto] md:items-start"
      onSubmit={async (e) => {
        e.preventDefault();
        setPending(true);
        setDone(null);
        setProblem(null);
        try {
          await waiveWarnings(datasetId, { rule, reason });
          setDone(`Waived "${rule}".`);
          setReason('');
          router.refresh();
        } catch (err) {
          setProblem(problemOf(err) ?? { message: 'The waiver could not be saved.' });
        } finally {
          setPending(false);
        }
      }}
    >
      <FormField id="waive-rule" label="Warning" error={error('waive-rule')}>
        {(a) => (
          <select {...a} className="field" value={rule} onChange={(e) => setRule(e.target.value)}>
            {rules.map((r) => (
              <option key={r.rule} value={r.rule}>
                {r.rule} ({r.count})
              </option>
            ))}
          </select>
        )}
      </FormField>
      <FormField id="waive-reason" label="Reason (kept with the dataset)" error={error('waive-reason')}>
        {(a) => <input {...a} className="field" value={reason} onChange={(e) => setReason(e.target.value)} maxLength={2000} />}
      </FormField>
      <button type="submit" className="btn md:mt-6" disabled={pending}>
        Waive
      </button>
      <div className="md:col-span-3">
        <FormMessage message={formMessage} />
        {done ? (
          <p role="status" className="text-sm text-[var(--color-good)]">
            {done}
          </p>
        ) : null}
      </div>
    </form>
  );
}
