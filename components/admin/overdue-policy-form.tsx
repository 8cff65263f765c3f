'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import type { OverduePolicy } from '@/db/schema';
import { overduePolicyLabels } from '@/lib/assumptions/overdue-policy';
import { apiSend } from '@/lib/client/api';
import { AppError } from '@/lib/errors';

/** An administrator chooses what happens to a value past its review-by date, with a reason that is kept. */
export function OverduePolicyForm({ current }: { current: OverduePolicy }) {
  const router = useRouter();
  const [policy, setPolicy] = useState<OverduePolicy>(current === 'flag' ? 'withdraw' : 'flag');
  const [reason, setReason] = useState('');
  const [pending, setPending] = useState(false);
  const [message, setMessage] = useState<{ ok: boolean; text: string; field?: string } | null>(null);
  const reasonInvalid = message && !message.ok && message.field === 'reason';
  return (
    <form
      aria-label="Change the overdue policy"
      className="space-y-3"
      onSubmit={async (e) => {
        e.preventDefault();
        setPending(true);
        setMessage(null);
        try {
          await apiSend('POST', '/api/admin/overdue-policy', { policy, reason });
          setMessage({ ok: true, text: `From now on: ${overduePolicyLabels[policy]}.` });
          setReason('');
          router.refresh();
        } catch (err) {
          const a = err instanceof AppError ? err : null;
          setMessage({ ok: false, text: a?.message ?? 'The policy could not be changed.', field: typeof a?.details?.field === 'string' ? a.details.field : undefined });
        } finally {
          setPending(false);
        }
      }}
    >
      <fieldset>
        <legend className="label">Past its review-by date, a published value is</legend>
        {(['flag', 'withdraw'] as const).map((p) => (
          <label key={p} className="flex items-center gap-2 text-sm">
            <input type="radio" name="policy" value={p} checked={policy === p} onChange={() => setPolicy(p)} />
            {overduePolicyLabels[p]}
            {p === current ? ' (in force)' : ''}
          </label>
        ))}
      </fieldset>
      <div>
        <label className="label" htmlFor="policy-reason">
          Reason (kept with the change)
        </label>
        <textarea
          id="policy-reason"
          className="field"
          rows={2}
          value={reason}
          onChange={(e) => setReason(e.target.value)}
          aria-invalid={reasonInvalid || undefined}
          aria-describedby={reasonInvalid ? 'policy-message' : undefined}
        />
      </div>
      <button type="submit" className="btn" disabled={pending || policy === current}>
        Change the policy
      </button>
      {message ? (
        <p id="policy-message" role={message.ok ? 'status' : 'alert'} className={`text-sm ${message.ok ? 'notice-good' : 'notice-bad'}`}>
          {message.text}
        </p>
      ) : null}
    </form>
  );
}
