import net from 'node:net';

/**
 * Whether the database accepts connections, for the proxy to answer a page with 503 and a sentence
 * while it is down (route handlers learn it from their own queries: lib/errors.ts errorResponse).
 * A TCP connection to DB_HOST:DB_PORT, at most one per second: a success is believed for a second,
 * so pages cost nothing while the database is up, and a dead one is noticed within a second of a
 * request. Connection refused or no answer within `timeoutMs` counts as down.
 */
let lastUp = 0;
let inFlight: Promise<boolean> | null = null;

export function databaseReachable(host: string, port: number, { timeoutMs = 1000, freshMs = 1000 } = {}): Promise<boolean> {
  if (Date.now() - lastUp < freshMs) return Promise.resolve(true);
  if (inFlight) return inFlight;
  // A port that is not one (a mistyped DB_PORT) cannot be reached: down, not a thrown RangeError.
  if (!Number.isInteger(port) || port < 1 || port > 65535) return Promise.resolve(false);
  inFlight = new Promise<boolean>((resolve) => {
    const socket = net.connect({ host, port });
    const done = (up: boolean) => {
      socket.destroy();
      if (up) lastUp = Date.now();
      inFlight = null;
      resolve(up);
    };
    socket.setTimeout(timeoutMs, () => done(false));
    socket.once('connect', () => done(true));
    socket.once('error', () => done(false));
  });
  return inFlight;
}

/** The page a browser gets while the database is down (503): a sentence, no script. */
export function databaseDownPage(): string {
  return `<!doctype html>
<html lang="en-GB"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>Rhobook is waiting for its database</title></head>
<body style="font-family: system-ui, sans-serif; max-width: 36rem; margin: 4rem auto; padding: 0 1.5rem; color: #1f2933">
<h1 style="font-size: 1.4rem">Rhobook cannot reach its database just now</h1>
<p>Nothing was read or changed. It usually comes back within seconds: reload this page shortly. If it lasts, tell an administrator.</p>
</body></html>
`;
}
