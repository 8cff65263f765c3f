'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { AppError } from '@/lib/errors';
import { deleteDataset, supersedeDataset } from '@/lib/client/datasets';

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
  const fail = (err: unknown) => setMessage({ ok: false, text: err instanceof AppError ? err.message : 'That did not work. Try again.' });
  return (
    <div className="space-y-2">
      <div className="flex flex-wrap items-end gap-3">
        {canSupersede && newer.length > 0 ? (
          <form
            className="flex items-end gap-2"
            aria-label="Supersede"
            onSubmit={async (e) => {
              e.preventDefault();
              try {
                await supersedeDataset(datasetId, Number(by));
                setMessage({ ok: true, text: `Superseded by dataset no. ${by}.` });
                router.refresh();
              } catch (err) {
                fail(err);
              }
            }}
          >
            <div>
              <label className="label" htmlFor="supersede-by">Superseded by (a newer dataset)</label>
              <select id="supersede-by" className="field" value={by} onChange={(e) => setBy(e.target.value)} required>
                <option value="">Choose…</option>
                {newer.map((d) => (
                  <option key={d.id} value={d.id}>
                    No. {d.id}: {d.name}
                  </option>
                ))}
              </select>
            </div>
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
      {message ? (
        <p role="status" className={`text-sm ${message.ok ? 'text-[var(--color-good)]' : 'notice-bad'}`}>
          {message.text}
        </p>
      ) : null}
    </div>
  );
}
