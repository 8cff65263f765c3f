#!/usr/bin/env node
// `npm test`: everything needed to pass the tests on a fresh clone, quiet on success and loud on
// failure. Steps: type check, ESLint, unit tests, integration tests (own database rhobook_test,
// never the demo one), production build, end-to-end tests in Debian's chromium. Ends with one line
// `N passed, N failed` and exits non-zero on any failure.
//
//   npm test                    everything
//   npm test -- unit e2e        only the named steps (typecheck lint unit integration build e2e)
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { dataDir, ensureBuild, ensureChromium, ensureDependencies, root, say, startChild, tsx, waitForHttp } from './common.mjs';
import { exited, hasExited } from './supervisor.mjs';
import { webNodeFlags } from './web-processes.mjs';

const ALL = ['typecheck', 'lint', 'unit', 'integration', 'build', 'e2e'];
const wanted = process.argv.slice(2).filter((a) => ALL.includes(a));
const steps = wanted.length ? wanted : ALL;
const logDir = path.join(dataDir, 'test-logs');
fs.mkdirSync(logDir, { recursive: true });

const TEST_DB = process.env.DB_TEST_NAME ?? 'rhobook_test';
const E2E_PORT = Number(process.env.E2E_PORT ?? 3100);
const testEnv = {
  DB_NAME: TEST_DB,
  NEXTAUTH_SECRET: 'rhobook-test-secret-0123456789abcdef',
  NEXTAUTH_URL: `http://127.0.0.1:${E2E_PORT}`,
  NEXT_TELEMETRY_DISABLED: '1',
  DEMO_PASSWORD: 'rhobook-demo',
  // The end-to-end tests wait for the scheduler to publish what a validator approved.
  SCHEDULER_INTERVAL_SECONDS: '3',
};

let passed = 0;
let failed = 0;
const failures = [];

/** Runs a command with its output going to a log; resolves to the exit code. */
function runLogged(name, cmd, args, env = {}) {
  const logFile = path.join(logDir, `${name}.log`);
  const out = fs.openSync(logFile, 'w');
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { cwd: root, env: { ...process.env, ...testEnv, ...env }, stdio: ['ignore', out, out] });
    child.on('exit', (code, signal) => {
      fs.closeSync(out);
      resolve({ code: code ?? (signal ? 1 : 0), logFile });
    });
  });
}

function showLog(logFile, maxChars = 60_000) {
  const text = fs.readFileSync(logFile, 'utf8');
  process.stdout.write(text.length > maxChars ? `... (start of ${logFile} cut)\n${text.slice(-maxChars)}` : text);
  process.stdout.write('\n');
}

function record(name, ok, detail, logFile) {
  if (ok) {
    passed += 1;
  } else {
    failed += 1;
    failures.push(name);
    say(`FAILED: ${name}${detail ? ` (${detail})` : ''}`);
    if (logFile) showLog(logFile);
  }
}

async function singleStep(name, cmd, args, env) {
  const t0 = Date.now();
  const { code, logFile } = await runLogged(name, cmd, args, env);
  record(name, code === 0, code === 0 ? null : `exit ${code}`, logFile);
  if (code === 0) say(`${name}: ok (${((Date.now() - t0) / 1000).toFixed(1)} s)`);
  return code === 0;
}

async function vitestStep(project) {
  const t0 = Date.now();
  const json = path.join(logDir, `${project}.json`);
  fs.rmSync(json, { force: true });
  const { code, logFile } = await runLogged(project, `${root}/node_modules/.bin/vitest`, [
    'run',
    '--project',
    project,
    '--reporter=default',
    '--reporter=json',
    `--outputFile.json=${json}`,
  ]);
  let p = 0;
  let f = 0;
  if (fs.existsSync(json)) {
    const r = JSON.parse(fs.readFileSync(json, 'utf8'));
    p = r.numPassedTests ?? 0;
    f = (r.numFailedTests ?? 0) + (r.numFailedTestSuites ?? 0);
    const skipped = (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0);
    if (skipped > 0) {
      f += skipped;
      say(`${project}: ${skipped} skipped or todo tests count as failures`);
    }
  }
  if (code !== 0 && f === 0) f = 1; // the runner itself failed (collection error, crash)
  passed += p;
  failed += f;
  if (f > 0 || code !== 0) {
    failures.push(project);
    say(`FAILED: ${project} (${f} failing)`);
    showLog(logFile);
  } else {
    say(`${project}: ${p} passed (${((Date.now() - t0) / 1000).toFixed(1)} s)`);
  }
}

async function resetTestDatabase({ seed }) {
  tsx('tests/support/reset-database.ts', seed ? ['--seed'] : [], { env: testEnv, label: 'reset the test database' });
}

async function e2eStep() {
  const t0 = Date.now();
  await resetTestDatabase({ seed: true });
  const serverLog = path.join(logDir, 'e2e-server.log');
  fs.writeFileSync(serverLog, '');
  const env = { ...testEnv };
  const web = startChild('web', process.execPath, [...webNodeFlags({ ...process.env, ...env }), 'lib/ops/web-server.mjs'], {
    env: { ...env, NODE_ENV: 'production', HOST: '127.0.0.1', PORT: String(E2E_PORT) },
    logFile: serverLog,
  });
  const worker = startChild('worker', process.execPath, ['--conditions=react-server', '--import', 'tsx', 'workers/index.ts'], {
    env,
    logFile: serverLog,
  });
  const stop = async () => {
    for (const c of [web, worker]) if (!hasExited(c)) c.kill('SIGTERM');
    await Promise.all([web, worker].map(exited));
  };
  try {
    await waitForHttp(`http://127.0.0.1:${E2E_PORT}/api/health`, 90_000);
    const json = path.join(logDir, 'e2e.json');
    fs.rmSync(json, { force: true });
    const { code, logFile } = await runLogged('e2e', `${root}/node_modules/.bin/playwright`, ['test', '--reporter=list,json'], {
      PLAYWRIGHT_JSON_OUTPUT_NAME: json,
      E2E_BASE_URL: `http://127.0.0.1:${E2E_PORT}`,
      PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD: '1',
    });
    let p = 0;
    let f = 0;
    if (fs.existsSync(json)) {
      const s = JSON.parse(fs.readFileSync(json, 'utf8')).stats ?? {};
      p = (s.expected ?? 0) + (s.flaky ?? 0);
      f = (s.unexpected ?? 0) + (s.skipped ?? 0);
    }
    if (code !== 0 && f === 0) f = 1;
    passed += p;
    failed += f;
    if (f > 0) {
      failures.push('e2e');
      say(`FAILED: e2e (${f} failing)`);
      showLog(logFile);
      say(`server log (${serverLog}):`);
      showLog(serverLog, 20_000);
    } else {
      say(`e2e: ${p} passed (${((Date.now() - t0) / 1000).toFixed(1)} s)`);
    }
  } finally {
    await stop();
  }
}

async function main() {
  const t0 = Date.now();
  ensureDependencies();
  if (steps.includes('e2e')) ensureChromium();
  const mariadb = await import('../../db/mariadb.mjs');
  let db = { started: false };
  if (steps.some((s) => s === 'integration' || s === 'e2e')) {
    db = await mariadb.start({ quiet: true });
    await resetTestDatabase({ seed: false });
  }
  try {
    if (steps.includes('typecheck')) {
      // next typegen writes the route types tsc checks against (.next/types) without a full build.
      await runLogged('typegen', `${root}/node_modules/.bin/next`, ['typegen']);
      await singleStep('typecheck', `${root}/node_modules/.bin/tsc`, ['--noEmit', '-p', '.']);
    }
    if (steps.includes('lint')) await singleStep('lint', `${root}/node_modules/.bin/eslint`, ['.', '--max-warnings=0']);
    if (steps.includes('unit')) await vitestStep('unit');
    if (steps.includes('integration')) await vitestStep('integration');
    let built = true;
    if (steps.includes('build') || steps.includes('e2e')) {
      try {
        const t1 = Date.now();
        const rebuilt = ensureBuild();
        record('build', true);
        say(`build: ok (${rebuilt ? `${((Date.now() - t1) / 1000).toFixed(1)} s` : 'up to date'})`);
      } catch (err) {
        built = false;
        record('build', false, err instanceof Error ? err.message.slice(0, 20_000) : String(err));
      }
    }
    if (steps.includes('e2e')) {
      if (built) await e2eStep();
      else record('e2e', false, 'skipped because the build failed');
    }
  } finally {
    if (db.started) await mariadb.stop({ quiet: true });
  }
  say(`finished in ${((Date.now() - t0) / 1000).toFixed(0)} s${failures.length ? `; failing: ${failures.join(', ')}` : ''}`);
  process.stdout.write(`${passed} passed, ${failed} failed\n`);
  process.exit(failed > 0 ? 1 : 0);
}

main().catch((err) => {
  process.stderr.write(`[rhobook] npm test could not run: ${err instanceof Error ? err.message : String(err)}\n`);
  process.stdout.write(`${passed} passed, ${failed + 1} failed\n`);
  process.exit(1);
});
