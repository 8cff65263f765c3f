/**
 * Cross-origin state changes are refused: a form auto-submitted as text/plain from another port of
 * the same host, a no-cors fetch (which a browser sends with its page's Origin and any content type
 * a form could send), and a server action posted from elsewhere. The route handlers and actions run
 * for real against MariaDB; only the session lookup (and, for actions, the request headers) is
 * replaced.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { count, eq } from 'drizzle-orm';

const OWN = vi.hoisted(() => {
  process.env.NEXTAUTH_URL = 'http://127.0.0.1:3000';
  return 'http://127.0.0.1:3000';
});
const OTHER_PORT = 'http://127.0.0.1:4444';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
const actionHeaders = vi.hoisted(() => ({ value: new Headers() }));
vi.mock('next/headers', () => ({ headers: async () => actionHeaders.value }));
vi.mock('next/cache', () => ({ revalidatePath: () => undefined }));

import { closeDb, getDb } from '@/db/connection';
import { assumptionVersions, datasets, users } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import * as draftRoute from '@/app/api/assumptions/route';
import * as transitionRoute from '@/app/api/assumptions/[id]/transitions/route';
import { POST as uploadRoute } from '@/app/api/datasets/route';
import { DELETE as deleteDatasetRoute } from '@/app/api/datasets/[id]/route';
import { POST as fitsRoute } from '@/app/api/fits/route';
import { changeRoleAction } from '@/app/(app)/admin/actions';
import { session } from '../../support/mock-session';
import { makeUser } from '../../support/users';
import { draftBody, makeFitRun } from '../../support/assumptions';
import { paramsOf, uploadRequest } from '../datasets/support';
import { makeCohortDataset } from '../../support/fit-data';

let analyst: SessionUser;
let validator: SessionUser;
let admin: SessionUser;

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  admin = await makeUser('admin');
});
afterAll(async () => {
  session.user = null;
  await closeDb();
});

async function answer(res: Response) {
  const text = await res.text();
  return { status: res.status, body: (text ? JSON.parse(text) : {}) as { code?: string; message?: string } };
}

async function newDraft(): Promise<number> {
  const segment = `Cross-origin ${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 6)}`;
  const { fitId } = await makeFitRun(analyst.id, segment);
  session.user = analyst;
  const res = await draftRoute.POST(
    new Request(`${OWN}/api/assumptions`, { method: 'POST', headers: { 'content-type': 'application/json', origin: OWN }, body: JSON.stringify(draftBody(fitId, segment)) }),
  );
  expect(res.status).toBe(201);
  return ((await res.json()) as { id: number }).id;
}

async function statusOf(id: number) {
  const [v] = await getDb().select({ status: assumptionVersions.status }).from(assumptionVersions).where(eq(assumptionVersions.id, id));
  return v.status;
}

describe('a draft moved to submitted by a form on another port (the reported attack)', () => {
  it('text/plain from another origin: 403, the draft stays a draft', async () => {
    const id = await newDraft();
    session.user = analyst;
    // What <form enctype="text/plain" method="post"> with one field named {"action":"submit","x":" sends.
    const form = new Request(`${OWN}/api/assumptions/${id}/transitions`, {
      method: 'POST',
      headers: { 'content-type': 'text/plain', origin: OTHER_PORT, 'sec-fetch-site': 'same-site' },
      body: '{"action":"submit","x":"=ignored"}',
    });
    const res = await answer(await transitionRoute.POST(form, paramsOf({ id: String(id) })));
    expect(res.status).toBe(403);
    expect(res.body.code).toBe('forbidden:cross-origin');
    expect(res.body.message).toBe(
      `This change was refused because it comes from ${OTHER_PORT}, not from ${OWN}. Make it from Rhobook's own pages (or from a script with an API token).`,
    );
    expect(await statusOf(id)).toBe('draft');
  });

  it('the same body as text/plain without any origin header: 415, still a draft', async () => {
    const id = await newDraft();
    session.user = analyst;
    const res = await answer(
      await transitionRoute.POST(
        new Request(`${OWN}/api/assumptions/${id}/transitions`, { method: 'POST', headers: { 'content-type': 'text/plain' }, body: '{"action":"submit"}' }),
        paramsOf({ id: String(id) }),
      ),
    );
    expect(res.status).toBe(415);
    expect(res.body.code).toBe('unsupported_media:json');
    expect(res.body.message).toMatch(/Content-Type: application\/json \(got text\/plain\)/);
    expect(await statusOf(id)).toBe('draft');
  });

  it('the app’s own page (its origin, JSON) may', async () => {
    const id = await newDraft();
    session.user = analyst;
    const res = await transitionRoute.POST(
      new Request(`${OWN}/api/assumptions/${id}/transitions`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', origin: OWN, 'sec-fetch-site': 'same-origin' },
        body: JSON.stringify({ action: 'submit' }),
      }),
      paramsOf({ id: String(id) }),
    );
    expect(res.status).toBe(200);
    expect(await statusOf(id)).toBe('submitted');
  });
});

describe('no-cors requests from another site', () => {
  it('a dataset upload is refused (403) and nothing is stored', async () => {
    session.user = analyst;
    const [before] = await getDb().select({ n: count() }).from(datasets);
    const req = uploadRequest({ kind: 'cohort', name: 'Planted' }, 'segment,period,obligors,defaults\nA,2015,100,1\n', 'x.csv', {
      origin: 'http://evil.example',
      'sec-fetch-site': 'cross-site',
      'sec-fetch-mode': 'no-cors',
    });
    const res = await answer(await uploadRoute(req));
    expect(res.status).toBe(403);
    expect(res.body.code).toBe('forbidden:cross-origin');
    const [after] = await getDb().select({ n: count() }).from(datasets);
    expect(after.n).toBe(before.n);
  });

  it('an upload that is not multipart is 415', async () => {
    session.user = analyst;
    const res = await answer(
      await uploadRoute(new Request(`${OWN}/api/datasets`, { method: 'POST', headers: { 'content-type': 'text/plain' }, body: 'segment,period\n' })),
    );
    expect(res.status).toBe(415);
    expect(res.body.code).toBe('unsupported_media:multipart');
  });

  it('a delete without Origin but marked cross-site by the browser is refused; the dataset stays', async () => {
    session.user = analyst;
    const { id } = await makeCohortDataset(analyst.id);
    const res = await answer(
      await deleteDatasetRoute(new Request(`${OWN}/api/datasets/${id}`, { method: 'DELETE', headers: { 'sec-fetch-site': 'cross-site' } }), paramsOf({ id: String(id) })),
    );
    expect(res.status).toBe(403);
    expect(await getDb().select({ id: datasets.id }).from(datasets).where(eq(datasets.id, id))).toHaveLength(1);
  });

  it('a fit request as a simple form post (urlencoded) is 415', async () => {
    session.user = analyst;
    const res = await answer(
      await fitsRoute(new Request(`${OWN}/api/fits`, { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: 'datasetId=1' })),
    );
    expect(res.status).toBe(415);
  });
});

describe('server actions', () => {
  it('a role change posted from another origin is refused with a sentence and changes nothing', async () => {
    session.user = admin;
    actionHeaders.value = new Headers({ origin: OTHER_PORT, host: '127.0.0.1:3000' });
    const form = new FormData();
    form.set('userId', String(validator.id));
    form.set('role', 'admin');
    const state = await changeRoleAction({ ok: false, message: null }, form);
    expect(state.ok).toBe(false);
    expect(state.message).toMatch(/^This change was refused because it comes from http:\/\/127\.0\.0\.1:4444/);
    const [u] = await getDb().select({ role: users.role }).from(users).where(eq(users.id, validator.id));
    expect(u.role).toBe('validator');

    // From the app's own page it goes through.
    actionHeaders.value = new Headers({ origin: OWN, host: '127.0.0.1:3000' });
    expect((await changeRoleAction({ ok: false, message: null }, form)).ok).toBe(true);
  });
});
