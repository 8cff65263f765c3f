/**
 * The compressed copy of an upload lives in a temporary file while it is validated and stored, not
 * in memory (lib/http/upload-spool.ts): it is removed whatever the outcome, and a file whose
 * compressed copy is longer than one stored piece is stored in several rows and read back whole.
 */
import { randomBytes } from 'node:crypto';
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gunzipSync } from 'node:zlib';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { SessionUser } from '@/lib/auth/guard';

vi.hoisted(() => {
  // The limit of the streaming check, small enough to pass with a few MB of generated data.
  process.env.UPLOAD_MAX_BYTES = String(8 * 1024 * 1024);
});
vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session as h } from '../../support/mock-session';

import { closeDb, getDb } from '@/db/connection';
import { datasetFiles } from '@/db/schema';
import { POST } from '@/app/api/datasets/route';
import { GET as fileRoute } from '@/app/api/datasets/[id]/file/route';
import { FILE_PIECE_BYTES } from '@/lib/dal/dataset-store';
import { makeUser } from '../../support/users';
import { paramsOf, uploadRequest } from './support';

// Temporary files go to a folder of this test's own (os.tmpdir() follows TMPDIR), so that other
// processes' uploads on the machine do not count.
const tmp = mkdtempSync(path.join(os.tmpdir(), 'rhobook-spool-test-'));
const outerTmp = process.env.TMPDIR;
process.env.TMPDIR = tmp;
const spools = () => readdirSync(tmp).filter((n) => n.startsWith('rhobook-upload-'));

let analyst: SessionUser;
beforeAll(async () => {
  analyst = await makeUser('analyst');
  h.user = analyst;
});
afterAll(async () => {
  await closeDb();
  if (outerTmp === undefined) delete process.env.TMPDIR;
  else process.env.TMPDIR = outerTmp;
  rmSync(tmp, { recursive: true, force: true });
});

const HEADER = 'segment,period,obligors,defaults,note\n';

/** A valid cohort file whose notes are random text, so that it compresses badly (about 3/4). */
function bulkyCohortFile(rows: number): string {
  let s = HEADER;
  for (let i = 0; i < rows; i++) {
    s += `Bulky ${i % 50},${1960 + Math.floor(i / 50)},1000,${i % 13},${randomBytes(700).toString('base64').slice(0, 900)}\n`;
  }
  return s;
}

describe('the temporary copy of an upload', () => {
  it('is removed after an accepted, a rejected, a duplicate and a too-large upload', async () => {
    const good = `${HEADER}Spool A,2015,100,2,\nSpool A,2016,110,3,\nSpool A,2017,120,1,\n`;
    expect((await POST(uploadRequest({ kind: 'cohort' }, good))).status).toBe(201);
    expect(spools()).toEqual([]);
    expect((await POST(uploadRequest({ kind: 'cohort' }, good))).status).toBe(409);
    expect(spools()).toEqual([]);
    expect((await POST(uploadRequest({ kind: 'cohort' }, `${HEADER}Spool B,2015,100,200,\n`))).status).toBe(422);
    expect(spools()).toEqual([]);
    // Over the limit while streaming (no Content-Length on a streamed body).
    const big = new Uint8Array(9 * 1024 * 1024).fill(65);
    const res = await POST(uploadRequest({ kind: 'cohort' }, big));
    expect(res.status).toBe(413);
    expect(spools()).toEqual([]);
  });

  it('longer than one stored piece is stored in several rows and downloads as uploaded', async () => {
    const text = bulkyCohortFile(50 * 130); // 6 MB raw, about 4.5 MB compressed
    const res = await POST(uploadRequest({ kind: 'cohort', name: 'Bulky notes' }, text, 'bulky.csv'));
    const body = await res.json();
    expect(res.status, JSON.stringify(body).slice(0, 300)).toBe(201);
    const pieces = await getDb().select({ seq: datasetFiles.seq, data: datasetFiles.data }).from(datasetFiles).where(eq(datasetFiles.datasetId, body.id)).orderBy(datasetFiles.seq);
    expect(pieces.length).toBeGreaterThan(1);
    expect(pieces.map((p) => p.seq)).toEqual(pieces.map((_, i) => i));
    for (const p of pieces.slice(0, -1)) expect(p.data.length).toBe(FILE_PIECE_BYTES);
    const download = await fileRoute(new Request('http://127.0.0.1/x'), paramsOf({ id: String(body.id) }));
    expect(download.status).toBe(200);
    expect(gunzipSync(Buffer.from(await download.arrayBuffer())).toString('utf8')).toBe(text);
    expect(spools()).toEqual([]);
  });
});
