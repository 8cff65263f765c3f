#!/usr/bin/env node
// The load generator of `npm run bench:api` (lib/bench/consumer-api.ts), in a process of its own:
// plain Node with autocannon and nothing else, so that the seeding and the app's modules loaded by
// the bench do not share its heap, its garbage collector or its event loop. It takes the plan as
// JSON in argv[2] ({ base, headers, rate, duration, connections, calls: [{ name, path }] }), warms
// up, runs each call on its own and then the calls in turn at the fixed overall rate, and prints
// one JSON line: [{ name, requests, rate, p50, p90, p99, max, errors, non2xx }].
import autocannon from 'autocannon';

const plan = JSON.parse(process.argv[2]);
const { base, headers, rate, duration, connections, calls } = plan;
const requests = calls.map((c) => ({ method: 'GET', path: c.path }));

// Warm-up: production compiles nothing, but the pools, the JIT and the answers kept fill.
await autocannon({ url: base, connections: 4, duration: 3, headers, requests });
const rows = [];
const summary = (name, r) => ({
  name,
  requests: r.requests.total,
  rate: r.requests.average,
  p50: r.latency.p50,
  p90: r.latency.p90,
  p99: r.latency.p99,
  max: r.latency.max,
  errors: r.errors + r.timeouts,
  non2xx: r.non2xx,
});
for (const c of calls) rows.push(summary(c.name, await autocannon({ url: `${base}${c.path}`, connections, duration, overallRate: rate, headers })));
rows.push(summary('the three in turn', await autocannon({ url: base, connections, duration, overallRate: rate, headers, requests })));
process.stdout.write(`${JSON.stringify(rows)}\n`);
