import { SMTPServer } from 'smtp-server';
import type { Db } from '@/db/connection';
import { mailCaptured } from '@/db/schema';

/**
 * A fake SMTP server for development and tests: listens on loopback only, accepts every message
 * without authentication, and stores it in `mail_captured` so that administrators can read it on
 * the Outbox screen and tests can check recipients. Never used when SMTP_URL is set.
 */
export type CaptureServer = { port: number; close: () => Promise<void> };

const MAX_BYTES = 2 * 1024 * 1024;

export function outboxIdOf(raw: string): number | null {
  const head = raw.split(/\r?\n\r?\n/, 1)[0] ?? '';
  const m = /^X-Rhobook-Outbox-Id:\s*(\d+)\s*$/im.exec(head);
  return m ? Number(m[1]) : null;
}

export async function startCaptureServer(db: Db, opts: { port?: number } = {}): Promise<CaptureServer> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    banner: 'Rhobook local mail capture',
    size: MAX_BYTES,
    logger: false,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      let size = 0;
      stream.on('data', (c: Buffer) => {
        size += c.length;
        if (size <= MAX_BYTES) chunks.push(c);
      });
      stream.on('error', (err) => callback(err));
      stream.on('end', () => {
        const raw = Buffer.concat(chunks).toString('utf8');
        const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
        const to = session.envelope.rcptTo.map((r) => r.address);
        db.insert(mailCaptured)
          .values({ outboxId: outboxIdOf(raw), envelopeFrom: from.slice(0, 254), envelopeTo: to, raw })
          .then(
            () => callback(),
            (err: Error) => callback(err),
          );
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port ?? 0, '127.0.0.1', () => resolve());
  });
  const address = server.server.address();
  const port = typeof address === 'object' && address ? address.port : 0;
  return {
    port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
