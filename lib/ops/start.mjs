#!/usr/bin/env node
// `npm start`: everything needed to run Rhobook on the demo data, on a fresh clone.
//   1. dependencies (npm ci when node_modules is missing or stale)
//   2. MariaDB on 127.0.0.1:$DB_PORT (installed from Debian's packages when missing)
//   3. migrations, then the demo organisation when the database is empty
//   4. next build when the build is missing or stale
//   5. the web app on 127.0.0.1:$PORT and the worker, supervised with the database: each is started
//      again when it dies (lib/ops/supervisor.mjs); Ctrl-C stops everything this started and leaves
//      alone a database that was already running
import { ensureDependencies, localSecret, say, startChild, tsx, ensureBuild, waitForHttp } from './common.mjs';
import { Supervisor } from './supervisor.mjs';
import { webNodeFlags } from './web-processes.mjs';

const port = Number(process.env.PORT ?? 3000);
const host = process.env.HOST ?? '127.0.0.1';

async function main() {
  ensureDependencies();
  const mariadb = await import('../../db/mariadb.mjs');
  const db = await mariadb.start();

  const secret = localSecret();
  const url = process.env.NEXTAUTH_URL ?? `http://${host === '0.0.0.0' ? '127.0.0.1' : host}:${port}`;
  const env = { NEXTAUTH_SECRET: secret, NEXTAUTH_URL: url, NEXT_TELEMETRY_DISABLED: '1' };

  say('applying migrations...');
  tsx('db/migrate.ts', [], { env });
  say('seeding the demo organisation if the database is empty...');
  const seed = tsx('db/seed.ts', [], { env });
  process.stdout.write(seed.stdout);
  ensureBuild();

  // Web process and worker under supervision (lib/ops/supervisor.mjs): restarted with backoff when
  // they die, the database too; Ctrl-C stops what this started.
  const supervisor = new Supervisor({ log: say });
  let stopping = false;
  const stopAll = async () => {
    if (stopping) return;
    stopping = true;
    say('stopping...');
    await supervisor.stop();
    process.exit(0);
  };
  process.on('SIGINT', () => void stopAll());
  process.on('SIGTERM', () => void stopAll());

  supervisor.watchDatabase(mariadb, db);
  supervisor.add('web', () =>
    startChild('web', process.execPath, [...webNodeFlags({ ...process.env, ...env }), 'lib/ops/web-server.mjs'], {
      env: { ...env, NODE_ENV: 'production', HOST: host, PORT: String(port) },
    }),
  );
  supervisor.add('worker', () => startChild('worker', process.execPath, ['--conditions=react-server', '--import', 'tsx', 'workers/index.ts'], { env }));
  await waitForHttp(`${url}/api/health`);
  const password = process.env.DEMO_PASSWORD ?? 'rhobook-demo';
  process.stdout.write(`
Rhobook is running at ${url}

Demo accounts of the invented Fenmoor Cooperative Bank (password: ${password}):
  analyst@fenmoor.example     analyst    uploads data, runs fits, drafts assumptions
  validator@fenmoor.example   validator  reviews and approves what others drafted
  viewer@fenmoor.example      viewer     reads published assumptions
  admin@fenmoor.example       admin      manages users, roles and API tokens

Press Ctrl-C to stop.
`);
}

main().catch((err) => {
  process.stderr.write(`[rhobook] npm start failed: ${err instanceof Error ? err.message : String(err)}\n`);
  process.exit(1);
});
