'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { pingModel, rotateSecret } from '@/lib/client/models';
import { AppError } from '@/lib/errors';

/** Rotate the webhook secret (shown once) or send a test event. */
export function ModelActions({ id }: { id: number }) {
  const router = useRouter();
  const [message, setMessage] = useState<{ ok: boolean; text: string; secret?: string } | null>(null);
  const run = async (fn: () => Promise<{ ok: boolean; text: string; secret?: string }>) => {
    setMessage(null);
    try {
      setMessage(await fn());
      router.refresh();
    } catch (err) {
      setMessage({ ok: false, text: err instanceof AppError ? err.message : 'That did not work.' });
    }
  };
  return (
    <div className="space-y-2">
      <div className="flex flex-wrap gap-2">
        <button type="button" className="btn btn-quiet" onClick={() => run(async () => ({ ok: true, text: `Test event queued (delivery ${(await pingModel(id)).deliveryId}); the worker sends it.` }))}>
          Send a test event
        </button>
        <button
          type="button"
          className="btn btn-quiet"
          onClick={() => {
            if (!window.confirm('Make a new webhook secret? The model must use the new one from now on; the old one stops working.')) return;
            void run(async () => ({ ok: true, text: 'New secret made. Copy it now; it is not shown again:', secret: (await rotateSecret(id)).webhookSecret }));
          }}
        >
          New webhook secret
        </button>
      </div>
      {message ? (
        <div role={message.ok ? 'status' : 'alert'} className={`text-sm ${message.ok ? 'notice-good' : 'notice-bad'}`}>
          {message.text}
          {message.secret ? <code className="mt-1 block break-all select-all" data-testid="webhook-secret">{message.secret}</code> : null}
        </div>
      ) : null}
    </div>
  );
}
