/**
 * A JSON body over the limit (JSON_BODY_MAX_BYTES, 1 MiB by default) is refused with 413 and a
 * sentence, whether it declares its length or streams without one; it was parsed whole and answered
 * 422 before. Nothing is stored.
 */
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { closeDb, getDb } from '@/db/connection';
import { assumptions } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import * as draftRoute from '@/app/api/assumptions/route';
import { draftBody, makeFitRun } from '../../support/assumptions';
import { makeUser } from '../../support/users';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session } from '../../support/mock-session';

let analyst: SessionUser;
beforeAll(async () => {
  analyst = await makeUser('analyst');
  session.user = analyst;
});
afterAll(async () => {
  session.user = null;
  await closeDb();
});

/** A valid draft padded to 2 MiB in its free text (the schema would refuse it later anyway). */
async function bigDraft(segment: string) {
  const { fitId } = await makeFitRun(analyst.id, segment);
  return JSON.stringify(draftBody(fitId, segment, { limitations: 'x'.repeat(2 * 1024 * 1024) }));
}

describe('JSON bodies over the limit', () => {
  it('a body that declares a length over the limit is refused with 413 before it is read', async () => {
    const segment = `Limit segment ${Date.now().toString(36)}-a`;
    const body = await bigDraft(segment);
    const res = await draftRoute.POST(
      new Request('http://127.0.0.1/api/assumptions', {
        method: 'POST',
        headers: { 'content-type': 'application/json', 'content-length': String(Buffer.byteLength(body)) },
        body,
      }),
    );
    expect(res.status).toBe(413);
    const json = (await res.json()) as { code: string; message: string };
    expect(json.code).toBe('too_large:json');
    expect(json.message).toBe(
      'The request body is larger than 1,048,576 bytes, the most a JSON request may carry (JSON_BODY_MAX_BYTES). Send less, or upload data files through the upload form.',
    );
    expect(await getDb().select().from(assumptions).where(eq(assumptions.segment, segment))).toEqual([]);
  });

  it('a streamed body without a length is cut off at the limit with 413', async () => {
    const segment = `Limit segment ${Date.now().toString(36)}-b`;
    const bytes = new TextEncoder().encode(await bigDraft(segment));
    let sent = 0;
    const stream = new ReadableStream<Uint8Array>({
      pull(controller) {
        if (sent >= bytes.length) return controller.close();
        controller.enqueue(bytes.subarray(sent, sent + 64 * 1024));
        sent += 64 * 1024;
      },
    });
    const res = await draftRoute.POST(
      new Request('http://127.0.0.1/api/assumptions', { method: 'POST', headers: { 'content-type': 'application/json' }, body: stream, duplex: 'half' } as RequestInit),
    );
    expect(res.status).toBe(413);
    expect(((await res.json()) as { code: string }).code).toBe('too_large:json');
    // Reading stopped at the limit: not the whole body was pulled.
    expect(sent).toBeLessThan(bytes.length);
  });

  it('a body just under the limit is read and judged on its content (422 for the oversized text, not 413)', async () => {
    const segment = `Limit segment ${Date.now().toString(36)}-c`;
    const { fitId } = await makeFitRun(analyst.id, segment);
    const body = JSON.stringify(draftBody(fitId, segment, { limitations: 'x'.repeat(900 * 1024) }));
    const res = await draftRoute.POST(new Request('http://127.0.0.1/api/assumptions', { method: 'POST', headers: { 'content-type': 'application/json' }, body }));
    expect(res.status).toBe(422);
  });
});
