import type { DbOrTx } from '@/db/connection';
import { mailOutbox } from '@/db/schema';
import { renderMail, type MailFacts, type MailKind, type Message, type OtherMailKind } from './templates';

/**
 * Writes one outbox row per recipient, in the caller's transaction: the mail goes out only if the
 * event commits, and a failure to send later never undoes the event. With a dedupe key (reminders)
 * a second write of the same message is ignored.
 */
export async function queueMail(
  tx: DbOrTx,
  m: ({ kind: MailKind; facts: MailFacts } | { kind: OtherMailKind; message: Message }) & {
    to: readonly string[];
    versionId?: number;
    dedupeKey?: (to: string) => string;
  },
): Promise<number> {
  const recipients = [...new Set(m.to.map((t) => t.trim().toLowerCase()).filter(Boolean))];
  if (!recipients.length) return 0;
  const { subject, body } = 'facts' in m ? renderMail(m.kind, m.facts) : m.message;
  const rows = recipients.map((to) => ({
    kind: m.kind,
    toAddress: to,
    subject: subject.slice(0, 300),
    body,
    versionId: m.versionId ?? null,
    dedupeKey: m.dedupeKey ? m.dedupeKey(to).slice(0, 160) : null,
  }));
  if (m.dedupeKey) {
    const [res] = await tx.insert(mailOutbox).ignore().values(rows);
    return res.affectedRows;
  }
  await tx.insert(mailOutbox).values(rows);
  return rows.length;
}
