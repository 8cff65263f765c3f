import net from 'node:net';
import { describe, expect, it } from 'vitest';
import { databaseReachable } from '@/lib/http/database-probe';

describe('databaseReachable', () => {
  it('answers down, without throwing, for a port that is not one (an unset or mistyped DB_PORT)', async () => {
    await expect(databaseReachable('127.0.0.1', Number('undefined'))).resolves.toBe(false);
    await expect(databaseReachable('127.0.0.1', 0)).resolves.toBe(false);
    await expect(databaseReachable('127.0.0.1', 70000)).resolves.toBe(false);
  });

  it('answers up for a port that accepts connections and down for one that refuses them', async () => {
    const server = net.createServer((s) => s.destroy());
    await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
    const { port } = server.address() as net.AddressInfo;
    await expect(databaseReachable('127.0.0.1', port, { freshMs: 0 })).resolves.toBe(true);
    await new Promise<void>((r) => server.close(() => r()));
    await expect(databaseReachable('127.0.0.1', port, { freshMs: 0 })).resolves.toBe(false);
  });
});
