'use client';

import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useEffect } from 'react';
import { cancelFit, fitStatusQuery, TERMINAL, type FitStatusDto } from '@/lib/client/fits';

/**
 * Follows a fit run live (TanStack Query polling GET /api/fits/:id, starting from the status the
 * server page prefetched). The page's URL carries the run id, so a reload picks the progress up
 * again. When the run finishes the server page is refreshed to render the review.
 */
export function FitProgress({ id, renderedStatus }: { id: number; renderedStatus: FitStatusDto['status'] }) {
  const router = useRouter();
  const qc = useQueryClient();
  const query = fitStatusQuery(id);
  const { data, error } = useQuery(query);
  const cancel = useMutation({
    mutationFn: () => cancelFit(id),
    onSettled: () => qc.invalidateQueries({ queryKey: query.queryKey }),
  });
  const status = data?.status ?? renderedStatus;
  useEffect(() => {
    if (TERMINAL.has(status) && status !== renderedStatus) router.refresh();
  }, [status, renderedStatus, router]);
  const pct = Math.max(0, Math.min(100, data?.progress ?? 0));
  return (
    <section className="panel space-y-3 p-5" aria-live="polite" data-testid="fit-progress">
      <div className="flex items-center justify-between">
        <h2>{status === 'queued' ? 'Waiting for a worker' : status === 'running' ? 'Fitting' : status === 'succeeded' ? 'Finished' : status === 'failed' ? 'Failed' : 'Cancelled'}</h2>
        <span className="num text-sm" data-testid="fit-progress-pct">
          {pct}%
        </span>
      </div>
      <div
        role="progressbar"
        aria-label="Fit progress"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={pct}
        className="h-3 w-full overflow-hidden rounded bg-[var(--color-accent-soft)]"
      >
        <div className="h-full bg-[var(--color-accent)] transition-[width] duration-500" style={{ width: `${pct}%` }} />
      </div>
      <p className="text-sm text-[var(--color-muted)]" data-testid="fit-progress-message">
        {data?.message ?? (status === 'queued' ? 'Queued; a worker will pick it up shortly.' : '')}
      </p>
      {status === 'queued' ? (
        <p className="text-xs text-[var(--color-muted)]">If nothing happens for a minute, check on the Overview that a worker is running.</p>
      ) : null}
      {data?.status === 'failed' && data.error ? <p className="notice-bad text-sm">{data.error}</p> : null}
      {error ? <p className="notice-bad text-sm">Could not read the progress: {error.message}</p> : null}
      {cancel.error ? <p className="notice-bad text-sm">{cancel.error.message}</p> : null}
      {data?.mayCancel && !TERMINAL.has(status) ? (
        <button type="button" className="btn btn-danger" onClick={() => cancel.mutate()} disabled={cancel.isPending}>
          {cancel.isPending ? 'Cancelling…' : 'Cancel this fit'}
        </button>
      ) : null}
    </section>
  );
}
