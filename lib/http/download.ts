/** A download name without characters that break a Content-Disposition header. */
export function safeDownloadName(name: string): string {
  return name.replace(/[^A-Za-z0-9._-]+/g, '_').slice(0, 120) || 'download';
}
