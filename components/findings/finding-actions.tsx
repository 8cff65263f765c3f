'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { FindingStatus } from '@/db/schema';
import { changeFinding } from '@/lib/client/findings';
import { AppError } from '@/lib/errors';
import { findingStatusLabels } from '@/lib/findings/rules';

/** Change a finding's status (with a comment; accepting needs the rationale) or add a comment. */
export function FindingActions({ id, statuses, mayComment }: { id: number; statuses: FindingStatus[]; mayComment: boolean }) {
  const router = useRouter();
  const [status, setStatus] = useState<FindingStatus | ''>('');
  const [comment, setComment] = useState('');
  const [pending, setPending] = useState(false);
  const [message, setMessage] = useState<{ ok: boolean; text: string; field?: string } | null>(null);
  if (!statuses.length && !mayComment) return <p className="text-sm text-[var(--color-muted)]">Nothing for you to do on this finding.</p>;
  const commentInvalid = message && !message.ok && message.field === 'comment';
  return (
    <form
      aria-label="Update the finding"
      className="space-y-3"
      onSubmit={async (e) => {
        e.preventDefault();
        setPending(true);
        setMessage(null);
        try {
          const f = await changeFinding(id, { ...(status ? { status } : {}), ...(comment.trim() ? { comment } : {}) });
          setMessage({ ok: true, text: status ? `The finding is now ${f.statusLabel}.` : 'Comment added.' });
          setStatus('');
          setComment('');
          router.refresh();
        } catch (err) {
          const a = err instanceof AppError ? err : null;
          setMessage({ ok: false, text: a?.message ?? 'The change could not be saved.', field: typeof a?.details?.field === 'string' ? a.details.field : undefined });
        } finally {
          setPending(false);
        }
      }}
    >
      {statuses.length ? (
        <div>
          <label className="label" htmlFor="finding-status">
            New status
          </label>
          <select id="finding-status" className="field" value={status} onChange={(e) => setStatus(e.target.value as FindingStatus | '')}>
            <option value="">(no change: comment only)</option>
            {statuses.map((s) => (
              <option key={s} value={s}>
                {findingStatusLabels[s]}
              </option>
            ))}
          </select>
        </div>
      ) : null}
      <div>
        <label className="label" htmlFor="finding-comment">
          {status === 'accepted' ? 'Rationale for accepting (required)' : 'Comment'}
        </label>
        <textarea
          id="finding-comment"
          className="field"
          rows={3}
          value={comment}
          onChange={(e) => setComment(e.target.value)}
          aria-invalid={commentInvalid || undefined}
          aria-describedby={commentInvalid ? 'finding-change-message' : undefined}
        />
      </div>
      <button type="submit" className="btn" disabled={pending}>
        {status ? 'Change status' : 'Add comment'}
      </button>
      {message ? (
        <p id="finding-change-message" role={message.ok ? 'status' : 'alert'} className={`text-sm ${message.ok ? 'notice-good' : 'notice-bad'}`}>
          {message.text}
        </p>
      ) : null}
    </form>
  );
}
