// A stand-in for lib/ops/web-server.mjs in tests/unit/ops/web-processes.test.ts: the same primary
// (lib/ops/web-processes.mjs), with copies that answer their pid on PORT instead of running Next.
import cluster from 'node:cluster';
import http from 'node:http';
import { leaveWithPrimary, runPrimary, webProcessCount } from '../../lib/ops/web-processes.mjs';

if (cluster.isPrimary) {
  process.stdout.write(`primary ${process.pid}\n`);
  await runPrimary(webProcessCount(), { initialMs: 200, maxMs: 1000, graceMs: 2000 });
}
leaveWithPrimary();
const server = http.createServer((req, res) => res.end(String(process.pid)));
server.listen(Number(process.env.PORT), '127.0.0.1', () => process.stdout.write(`copy ${process.env.WEB_PROCESS_SLOT} ${process.pid}\n`));
process.on('SIGTERM', () => server.close(() => process.exit(0)));
