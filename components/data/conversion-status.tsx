'use client';

import { useQuery } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useEffect } from 'react';
import { ProgressBar } from './progress-bar';
import { uploadReportQuery } from '@/lib/client/datasets';

/**
 * The conversion of a loan tape, live: polls its upload report (with the job's progress) and
 * reloads the page's server data when the conversion ends, whatever the outcome.
 */
export function ConversionStatus({ reportId }: { reportId: number }) {
  const router = useRouter();
  const { data: report } = useQuery(uploadReportQuery(reportId));
  const done = report !== undefined && report.status !== 'processing';
  useEffect(() => {
    if (done) router.refresh();
  }, [done, router]);
  const job = report?.job ?? null;
  const waiting = !job || job.status === 'queued';
  return (
    <div className="notice-caution space-y-2 text-sm" role="status">
      <p>
        {done
          ? 'The conversion has ended; loading the result…'
          : 'The worker is checking every row of this loan tape and counting its annual cohorts. This page updates by itself.'}
      </p>
      {!done ? (
        <div className="flex items-center gap-3">
          <ProgressBar value={waiting ? null : job.progress / 100} label="Conversion progress" />
          <span className="num w-12 text-right">{waiting ? '' : `${job.progress}%`}</span>
        </div>
      ) : null}
      {!done ? <p className="text-xs">{waiting ? 'Waiting for a worker…' : job.message ?? ''}</p> : null}
    </div>
  );
}
