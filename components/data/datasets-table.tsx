'use client';

import { useQuery } from '@tanstack/react-query';
import Link from 'next/link';
import { useMemo, useState } from 'react';
import type { DatasetDto } from '@/lib/dal/datasets';
import { formatSize, formatWhen, kindLabels, statusLabels } from './format';
import { datasetsQuery } from '@/lib/client/datasets';

type SortKey = 'id' | 'name' | 'kind' | 'uploadedBy' | 'createdAt' | 'rowCount' | 'status';

const columns: { key: SortKey; label: string; numeric?: boolean }[] = [
  { key: 'id', label: 'No.', numeric: true },
  { key: 'name', label: 'Name' },
  { key: 'kind', label: 'Kind' },
  { key: 'uploadedBy', label: 'Uploaded by' },
  { key: 'createdAt', label: 'When (UTC)' },
  { key: 'rowCount', label: 'Cohort rows', numeric: true },
  { key: 'status', label: 'Status' },
];

function sortValue(d: DatasetDto, key: SortKey): string | number {
  if (key === 'uploadedBy') return d.uploadedBy.name.toLowerCase();
  if (key === 'name') return d.name.toLowerCase();
  return d[key];
}

/**
 * The datasets, sortable by any column and filtered by text, kind and status. The page prefetches
 * the list (a HydrationBoundary), which replaces whatever an earlier visit left in the cache.
 */
export function DatasetsTable({ canUpload = false }: { canUpload?: boolean }) {
  const { data = [] } = useQuery(datasetsQuery());
  const [text, setText] = useState('');
  const [kind, setKind] = useState('');
  const [status, setStatus] = useState('');
  const [showSuperseded, setShowSuperseded] = useState(true);
  const [sort, setSort] = useState<{ key: SortKey; dir: 1 | -1 }>({ key: 'id', dir: -1 });

  const rows = useMemo(() => {
    const q = text.trim().toLowerCase();
    return data
      .filter(
        (d) =>
          (!q || `${d.name} ${d.fileName} ${d.sha256} ${d.uploadedBy.name} ${d.description ?? ''}`.toLowerCase().includes(q)) &&
          (!kind || d.kind === kind) &&
          (!status || d.status === status) &&
          (showSuperseded || !d.supersededBy),
      )
      .sort((a, b) => {
        const x = sortValue(a, sort.key);
        const y = sortValue(b, sort.key);
        return (x < y ? -1 : x > y ? 1 : 0) * sort.dir;
      });
  }, [data, text, kind, status, showSuperseded, sort]);

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3" role="search" aria-label="Filter datasets">
        <div className="min-w-[16rem] flex-1">
          <label className="label" htmlFor="ds-filter">Find (name, file, hash, uploader)</label>
          <input id="ds-filter" className="field" value={text} onChange={(e) => setText(e.target.value)} />
        </div>
        <div>
          <label className="label" htmlFor="ds-kind">Kind</label>
          <select id="ds-kind" className="field" value={kind} onChange={(e) => setKind(e.target.value)}>
            <option value="">All kinds</option>
            <option value="cohort">{kindLabels.cohort}</option>
            <option value="vintage">{kindLabels.vintage}</option>
            <option value="loans">{kindLabels.loans}</option>
          </select>
        </div>
        <div>
          <label className="label" htmlFor="ds-status">Status</label>
          <select id="ds-status" className="field" value={status} onChange={(e) => setStatus(e.target.value)}>
            <option value="">Any status</option>
            <option value="ready">ready</option>
            <option value="processing">converting</option>
            <option value="failed">failed</option>
          </select>
        </div>
        <label className="flex items-center gap-1.5 pb-2 text-sm">
          <input type="checkbox" checked={showSuperseded} onChange={(e) => setShowSuperseded(e.target.checked)} />
          Show superseded
        </label>
      </div>
      <div className="overflow-x-auto">
        <table className="table" data-testid="datasets-table">
          <thead>
            <tr>
              {columns.map((c) => {
                const active = sort.key === c.key;
                return (
                  <th key={c.key} scope="col" aria-sort={active ? (sort.dir === 1 ? 'ascending' : 'descending') : 'none'} className={c.numeric ? 'text-right' : ''}>
                    <button
                      type="button"
                      className="font-semibold text-[var(--color-muted)] hover:text-[var(--color-ink)]"
                      onClick={() => setSort({ key: c.key, dir: active ? (sort.dir === 1 ? -1 : 1) : c.numeric || c.key === 'createdAt' ? -1 : 1 })}
                    >
                      {c.label}
                      <span aria-hidden="true" className="ml-1 inline-block w-3">{active ? (sort.dir === 1 ? '▲' : '▼') : ''}</span>
                    </button>
                  </th>
                );
              })}
              <th scope="col">SHA-256</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((d) => (
              <tr key={d.id} className={d.supersededBy ? 'text-[var(--color-muted)]' : ''}>
                <td className="num text-right">{d.id}</td>
                <td>
                  <Link href={`/data/${d.id}`}>{d.name}</Link>
                  <div className="text-xs text-[var(--color-muted)]">
                    {d.fileName} · {formatSize(d.sizeBytes)}
                    {d.supersededBy ? <> · superseded by no. {d.supersededBy.id}</> : null}
                  </div>
                </td>
                <td className="whitespace-nowrap">{kindLabels[d.kind]}</td>
                <td>{d.uploadedBy.name}</td>
                <td className="num whitespace-nowrap text-xs">{formatWhen(d.createdAt)}</td>
                <td className="num text-right">
                  {d.status === 'ready' ? d.rowCount.toLocaleString('en-GB') : '—'}
                  {d.status === 'ready' ? (
                    <div className="text-xs text-[var(--color-muted)]">
                      {d.segmentCount} segment{d.segmentCount === 1 ? '' : 's'}
                    </div>
                  ) : null}
                </td>
                <td className="whitespace-nowrap">
                  <StatusBadge d={d} />
                  {d.warningCount > 0 ? (
                    <div className="text-xs text-[var(--color-caution)]">
                      {d.warningCount.toLocaleString('en-GB')} warning{d.warningCount === 1 ? '' : 's'}
                    </div>
                  ) : null}
                </td>
                <td className="num text-xs" title={d.sha256}>
                  {d.sha256.slice(0, 12)}…
                </td>
              </tr>
            ))}
            {rows.length === 0 ? (
              <tr>
                <td colSpan={8} className="py-6 text-center text-[var(--color-muted)]">
                  {data.length > 0 ? (
                    'No dataset matches the filter.'
                  ) : canUpload ? (
                    <>
                      No datasets yet — <Link href="/data/upload">upload one</Link> (a sample file of each kind is offered there).
                    </>
                  ) : (
                    'No datasets yet. Analysts upload them; they will appear here.'
                  )}
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
      {data.length > 0 ? (
        <p className="text-xs text-[var(--color-muted)]">
          {rows.length} of {data.length} dataset{data.length === 1 ? '' : 's'} shown. Click a column heading to sort.
        </p>
      ) : null}
    </div>
  );
}

export function StatusBadge({ d }: { d: Pick<DatasetDto, 'status' | 'job'> }) {
  const cls =
    d.status === 'ready'
      ? 'bg-[var(--color-good-soft)] text-[var(--color-good)]'
      : d.status === 'failed'
        ? 'bg-[var(--color-bad-soft)] text-[var(--color-bad)]'
        : 'bg-[var(--color-caution-soft)] text-[var(--color-caution)]';
  return (
    <span className={`badge ${cls}`}>
      {statusLabels[d.status]}
      {d.status === 'processing' && d.job ? (d.job.status === 'queued' ? ', waiting' : ` ${d.job.progress}%`) : ''}
    </span>
  );
}
