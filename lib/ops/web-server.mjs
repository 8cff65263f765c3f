#!/usr/bin/env node
// The web process of `npm start` and of the end-to-end tests: Next's request handler (the same as
// `next start`, from the build in .next or NEXT_DIST_DIR) behind node:http, so that each request
// carries the socket address it came from (lib/ops/socket-stamp.mjs); the sign-in throttle reads it
// (lib/auth/client-address.ts), believing X-Forwarded-For only from TRUSTED_PROXIES. Before Next it
// refuses methods the app does not serve (405) and, in production, the public development session
// secret (lib/ops/http-guard.mjs). With WEB_PROCESSES above 1 (the default is one per core, up to
// two) this process is the primary of that many copies sharing the port (lib/ops/web-processes.mjs).
//
//   NODE_ENV=production HOST=127.0.0.1 PORT=3000 [WEB_PROCESSES=2] node [--single-threaded-gc] lib/ops/web-server.mjs
//   (npm start adds the flag when the web processes take every core: webNodeFlags in web-processes.mjs)
import cluster from 'node:cluster';
import { randomBytes } from 'node:crypto';
import http from 'node:http';
import next from 'next';
import { root } from './common.mjs';
import { productionSecretProblem, refuseUnknownMethod } from './http-guard.mjs';
import { stampSocket } from './socket-stamp.mjs';
import { leaveWithPrimary, runPrimary, webProcessCount } from './web-processes.mjs';

const secretProblem = productionSecretProblem(process.env);
if (secretProblem) {
  console.error(`[web] refusing to start: ${secretProblem}`);
  process.exit(2);
}

let processes = 1;
try {
  processes = webProcessCount();
} catch (err) {
  console.error(`[web] refusing to start: ${err.message}`);
  process.exit(2);
}
if (processes > 1 && cluster.isPrimary) await runPrimary(processes);
leaveWithPrimary();

const port = Number(process.env.PORT ?? 3000);
const host = process.env.HOST ?? '127.0.0.1';
const token = randomBytes(18).toString('base64url');
process.env.RHOBOOK_SOCKET_TOKEN = token;

const app = next({ dev: false, dir: root, hostname: host, port });
await app.prepare();
const handle = app.getRequestHandler();

const server = http.createServer((req, res) => {
  if (refuseUnknownMethod(req, res)) return;
  stampSocket(req, token);
  void handle(req, res);
});
server.listen(port, host, () => {
  console.log(`[web] listening on http://${host}:${port}`);
});

let closing = false;
for (const signal of ['SIGINT', 'SIGTERM']) {
  process.on(signal, () => {
    if (closing) return;
    closing = true;
    server.close(() => process.exit(0));
    // Keep-alive connections would hold close() open: give them a moment, then leave.
    setTimeout(() => process.exit(0), 3000).unref();
  });
}
