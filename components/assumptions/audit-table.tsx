import { ScrollBox } from '@/components/layout/scroll-box';
import { statusLabels } from '@/lib/assumptions/lifecycle';

type AuditRow = {
  id: number;
  at: string;
  version: number;
  action: string;
  actorEmail: string;
  actorRole: string;
  fromStatus: string | null;
  toStatus: string;
  comment: string | null;
  contentHash: string;
};

const label = (s: string) => statusLabels[s as keyof typeof statusLabels] ?? s;

/** The append-only audit trail of a version's assumption (a segment's or a factor-correlation matrix's), oldest first. */
export function AuditTable({ audit }: { audit: readonly AuditRow[] }) {
  return (
    <ScrollBox label="Audit trail (scrolls sideways)">
      <table className="table" aria-label="Audit trail">
        <thead>
          <tr>
            <th>When (UTC)</th>
            <th>Version</th>
            <th>Action</th>
            <th>Who</th>
            <th>From → to</th>
            <th>Comment</th>
            <th>Content hash</th>
          </tr>
        </thead>
        <tbody>
          {audit.map((a) => (
            <tr key={a.id}>
              <td className="num whitespace-nowrap">{a.at.replace('T', ' ').slice(0, 19)}</td>
              <td>v{a.version}</td>
              <td>{a.action}</td>
              <td>
                {a.actorEmail} <span className="badge">{a.actorRole}</span>
              </td>
              <td>
                {a.fromStatus ? label(a.fromStatus) : '—'} → {label(a.toStatus)}
              </td>
              <td className="whitespace-pre-wrap">{a.comment ?? ''}</td>
              <td className="num text-xs" title={a.contentHash}>
                {a.contentHash.slice(0, 12)}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </ScrollBox>
  );
}
