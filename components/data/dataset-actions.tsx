'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import { AppError } from '@/lib/errors';
import { deleteDataset, supersedeDataset } from '@/lib/client/datasets';
import { problemOf, type FormFieldRef, type FormProblem } from '@/lib/forms/place-errors';

const FIELDS: readonly FormFieldRef[] = [['by', 'supersede-by']];

/** Supersede this dataset by a newer one, or delete it (refused while a fit or assumption uses it). */
export function DatasetActions({
  datasetId,
  canDelete,
  canSupersede,
  newer,
}: {
  datasetId: number;
  canDelete: boolean;
  canSupersede: boolean;
  newer: { id: number; name: string }[];
}) {
  const router = useRouter();
  const [by, setBy] = useState('');
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [problem, setProblem] = useState<FormProblem>(null);
  const { error, formMessage } = useFieldErrors(problem, FIELDS);
  const fail = (err: unknown) => {
    setMessage(null);
    setProblem(err instanceof AppError ? problemOf(err) : { message: 'That did not work. Try again.' });
  };
  return (
    <div className="space-y-2">
      <div className="flex flex-wrap items-end gap-3">
        {canSupersede && newer.length > 0 ? (
          <form
            className="flex items-end gap-2"
            aria-label="Supersede"
            noValidate
            onSubmit={async (e) => {
              e.preventDefault();
              setProblem(null);
              if (!by) return setProblem({ message: 'Choose the newer dataset that supersedes this one.', field: 'by' });
              try {
                await supersedeDataset(datasetId, Number(by));
                setMessage({ ok: true, text: `Superseded by dataset no. ${by}.` });
                router.refresh();
              } catch (err) {
                fail(err);
              }
            }}
          >
            <FormField id="supersede-by" label="Superseded by (a newer dataset)" error={error('supersede-by')}>
              {(a) => (
                <select {...a} className="field" value={by} onChange={(e) => setBy(e.target.value)}>
                  <option value="">Choose…</option>
                  {newer.map((d) => (
                    <option key={d.id} value={d.id}>
                      No. {d.id}: {d.name}
                    </option>
                  ))}
                </select>
              )}
            </FormField>
            <button type="submit" className="btn btn-quiet">
              Supersede
            </button>
          </form>
        ) : null}
        {canDelete ? (
          <button
            type="button"
            className="btn btn-danger"
            onClick={async () => {
              if (!window.confirm('Delete this dataset, its cohort rows and its stored file? Its upload report is kept.')) return;
              try {
                await deleteDataset(datasetId);
                router.push('/data');
                router.refresh();
              } catch (err) {
                fail(err);
              }
            }}
          >
            Delete dataset
          </button>
        ) : null}
      </div>
      <FormMessage message={formMessage} />
      {message ? (
        <p role="status" className="text-sm text-[var(--color-good)]">
          {message.text}
        </p>
      ) : null}
    </div>
  );
}
