import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { closeDb, getDb } from '@/db/connection';
import { mailOutbox } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';
import { makeUser } from '../../support/users';

/**
 * The Outbox screen is the local mail capture's: shown to administrators whenever SMTP_URL is unset
 * (also in production mode, which `npm start` uses), and gone when a real SMTP server is configured.
 * lib/env caches the environment, so each case loads a fresh copy of the modules.
 */
let admin: SessionUser;
let analyst: SessionUser;

beforeAll(async () => {
  admin = await makeUser('admin');
  analyst = await makeUser('analyst');
  await getDb()
    .insert(mailOutbox)
    .values({ kind: 'awaiting-review', toAddress: 'someone@fenmoor.example', subject: 'Outbox test', body: 'Body of the outbox test.' });
});
const pools: (() => Promise<void>)[] = [];
afterEach(async () => {
  for (const close of pools.splice(0)) await close();
  vi.unstubAllEnvs();
});
afterAll(async () => {
  await closeDb();
});

async function fresh() {
  vi.resetModules();
  const connection = await import('@/db/connection');
  pools.push(() => connection.closeDb());
  return import('@/lib/dal/outbox');
}

describe('mail outbox', () => {
  it('in production mode without SMTP_URL the admin reads the captured messages with their bodies', async () => {
    vi.stubEnv('NODE_ENV', 'production');
    vi.stubEnv('SMTP_URL', '');
    const { listOutbox, mailIsCaptured } = await fresh();
    expect(mailIsCaptured()).toBe(true);
    const mail = await listOutbox(admin);
    const m = mail.find((x) => x.subject === 'Outbox test');
    expect(m?.body).toBe('Body of the outbox test.');
  });

  it('with SMTP_URL set there is no outbox: 404 naming the reason', async () => {
    vi.stubEnv('SMTP_URL', 'smtp://mail.fenmoor.example:587');
    const { listOutbox, mailIsCaptured } = await fresh();
    expect(mailIsCaptured()).toBe(false);
    await expect(listOutbox(admin)).rejects.toMatchObject({ status: 404, message: expect.stringContaining('SMTP_URL') });
  });

  it('only administrators read it', async () => {
    vi.stubEnv('SMTP_URL', '');
    const { listOutbox } = await fresh();
    await expect(listOutbox(analyst)).rejects.toMatchObject({ status: 403 });
  });
});
