'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { AppError } from '@/lib/errors';
import { waiveWarnings } from '@/lib/client/datasets';

/** Waives the warnings of one rule on a dataset, with a reason (kept with the dataset). */
export function WaiveForm({ datasetId, rules }: { datasetId: number; rules: { rule: string; count: number }[] }) {
  const router = useRouter();
  const [rule, setRule] = useState(rules[0]?.rule ?? '');
  const [reason, setReason] = useState('');
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [pending, setPending] = useState(false);
  if (rules.length === 0) return null;
  return (
    <form
      aria-label="Waive a warning"
      className="grid gap-2 md:grid-cols-[14rem_1fr_auto] md:items-end"
      onSubmit={async (e) => {
        e.preventDefault();
        setPending(true);
        try {
          await waiveWarnings(datasetId, { rule, reason });
          setMessage({ ok: true, text: `Waived "${rule}".` });
          setReason('');
          router.refresh();
        } catch (err) {
          setMessage({ ok: false, text: err instanceof AppError ? err.message : 'The waiver could not be saved.' });
        } finally {
          setPending(false);
        }
      }}
    >
      <div>
        <label className="label" htmlFor="waive-rule">Warning</label>
        <select id="waive-rule" className="field" value={rule} onChange={(e) => setRule(e.target.value)}>
          {rules.map((r) => (
            <option key={r.rule} value={r.rule}>
              {r.rule} ({r.count})
            </option>
          ))}
        </select>
      </div>
      <div>
        <label className="label" htmlFor="waive-reason">Reason (kept with the dataset)</label>
        <input id="waive-reason" className="field" value={reason} onChange={(e) => setReason(e.target.value)} minLength={10} maxLength={2000} required />
      </div>
      <button type="submit" className="btn" disabled={pending}>
        Waive
      </button>
      {message ? (
        <p role="status" className={`text-sm md:col-span-3 ${message.ok ? 'text-[var(--color-good)]' : 'text-[var(--color-bad)]'}`}>
          {message.text}
        </p>
      ) : null}
    </form>
  );
}
