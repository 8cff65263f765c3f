// The supervisor of `npm start` (lib/ops/supervisor.mjs) watching a MariaDB instance of its own,
// for tests/integration/ops/supervisor.test.ts: RHOBOOK_DATA_DIR and DB_PORT name a data directory
// and port of the test's, so killing that mariadbd never touches the shared test database.
// SUPERVISE_CHILD=crash|signal adds a process that exits at once (code 3) or kills itself (SIGKILL);
// SUPERVISE_INITIAL_MS sets the first restart pause. Prints what the supervisor logs, one per line.
import { spawn } from 'node:child_process';
import { Supervisor } from '../../lib/ops/supervisor.mjs';

const mariadb = await import('../../db/mariadb.mjs');
const state = await mariadb.start({ quiet: true });
console.log(`database ${state.started ? 'started' : 'reused'} pid ${state.pid}`);
const supervisor = new Supervisor({ log: (m) => console.log(m), dbPollMs: 100, initialMs: Number(process.env.SUPERVISE_INITIAL_MS ?? 1000) });
supervisor.watchDatabase(mariadb, state);
const child = process.env.SUPERVISE_CHILD;
if (child) {
  const code = child === 'signal' ? "process.kill(process.pid, 'SIGKILL')" : 'setTimeout(() => process.exit(3), 20)';
  supervisor.add(child, () => spawn(process.execPath, ['-e', code], { stdio: 'ignore' }));
}
process.on('SIGINT', async () => {
  const t0 = Date.now();
  await supervisor.stop();
  console.log(`stopped in ${Date.now() - t0} ms`);
  process.exit(0);
});
console.log('ready');
