/** Small display helpers shared by the data screens (no data access). */
export function formatSize(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
  if (bytes >= 1024) return `${(bytes / 1024).toFixed(1)} KB`;
  return `${bytes} B`;
}

export function formatWhen(iso: string): string {
  return iso.replace('T', ' ').slice(0, 16);
}

export const kindLabels = { cohort: 'Cohort counts', vintage: 'Vintages', loans: 'Loan tape' } as const;

export const statusLabels = { processing: 'converting', ready: 'ready', failed: 'failed' } as const;
