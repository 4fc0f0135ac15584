// `npm run bench:api`: the API under load, measured with autocannon against a real server.
//
// A child process serves Ringwell on 127.0.0.1 (random port) from a fresh in-memory database with
// the demo seed (db/seed.ts and the demo workspace), so the load generator and the server do not
// share an event loop. Per route (sign-in, list designs, a single check, a precharge sizing) and at
// 10 and 50 connections: requests/s, p50 and p99 latency, errors and non-2xx answers, each run
// bounded by a duration and a request count. Then GET /api/health is hammered while a
// 100 000-sample spread runs, to see whether heavy analyses block the event loop.
//
// The bench server lifts the per-user analysis rate limit (analysisRateLimit: null) and the sign-in
// limits, which would otherwise throttle one user after a few hundred requests; it says so in the
// output. Exits 1 when any request errored, timed out or answered other than 2xx.
//
//   npm run bench:api                    default: 8 s per run, at most 20 000 requests
//   BENCH_SECONDS=4 npm run bench:api    shorter runs
import { fork, type ChildProcess } from 'node:child_process';
import os from 'node:os';
import autocannon from 'autocannon';
import { sizingRequest } from '../tests/helpers/fixtures';

const SECONDS = Number(process.env.BENCH_SECONDS ?? 8);
const MAX_REQUESTS = Number(process.env.BENCH_MAX_REQUESTS ?? 20_000);
const CONNECTIONS = [10, 50];
const SPREAD_SAMPLES = 100_000;
const HEALTH_SECONDS = Number(process.env.BENCH_HEALTH_SECONDS ?? 15);
const ENGINEER = { email: 'sam@northfold.example', password: 'northfold-engineer' };

// ---------------------------------------------------------------------------------------------
// The server (child process)

async function serve(): Promise<void> {
  const { openDatabase } = await import('../db/client');
  const { seedDemo } = await import('../db/seed');
  const { createApp, createAppContext } = await import('../server/app');
  const { hashPassword } = await import('../server/auth/passwords');
  const { seedDemoWorkspace } = await import('../server/services/demoWorkspace');
  const database = await openDatabase({ dataDir: null });
  const quiet = () => undefined;
  const unlimited = { limit: 1_000_000_000, windowMs: 60_000 };
  const options = {
    database,
    webDir: null,
    log: (message: string, error?: unknown) => console.error(`[bench server] ${message}`, error ?? ''),
    analysisRateLimit: null,
    rateLimits: { signInPerIp: unlimited, signInPerAccount: unlimited, signUpPerIp: unlimited },
  };
  const seeded = await seedDemo(database.db, hashPassword);
  if (!seeded.teamId) throw new Error('the demo seed did not run on a fresh database');
  await seedDemoWorkspace(createAppContext({ ...options, log: quiet }), seeded.teamId);
  const app = createApp(options);
  const server = app.listen(0, '127.0.0.1', () => {
    const address = server.address();
    process.send!({ port: typeof address === 'object' && address ? address.port : 0 });
  });
  // The parent asks for this process's CPU time (all threads) around each run: CPU per request is a
  // figure that other load on the machine changes much less than latency.
  process.on('message', (m: { type?: string }) => {
    if (m?.type === 'cpu') {
      const u = process.cpuUsage();
      process.send!({ type: 'cpu', micros: u.user + u.system });
    }
  });
  process.on('disconnect', () => process.exit(0));
}

// ---------------------------------------------------------------------------------------------
// The load (parent process)

interface Row {
  route: string;
  connections: number;
  requests: number;
  seconds: number;
  rps: number;
  p50: number;
  p99: number;
  errors: number;
  timeouts: number;
  non2xx: number;
  /** Server CPU time (user + system, all threads) per answered request. */
  cpuMs: number;
}

let server: ChildProcess | null = null;
function serverCpuMicros(): Promise<number> {
  return new Promise((resolve) => {
    const onMessage = (m: { type?: string; micros?: number }) => {
      if (m?.type !== 'cpu') return;
      server!.off('message', onMessage);
      resolve(m.micros!);
    };
    server!.on('message', onMessage);
    server!.send({ type: 'cpu' });
  });
}

function startServer(): Promise<{ child: ChildProcess; base: string }> {
  return new Promise((resolve, reject) => {
    const child = fork(__filename, ['--serve'], { execArgv: process.execArgv, stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
    server = child;
    child.once('message', (m: { port: number }) => resolve({ child, base: `http://127.0.0.1:${m.port}` }));
    child.once('exit', (code) => reject(new Error(`the bench server exited (${code}) before listening`)));
  });
}

async function json(base: string, path: string, init: { method?: string; body?: unknown; cookie?: string } = {}) {
  const res = await fetch(base + path, {
    method: init.method ?? 'GET',
    headers: { 'content-type': 'application/json', ...(init.cookie ? { cookie: init.cookie } : {}) },
    body: init.body === undefined ? undefined : JSON.stringify(init.body),
  });
  const text = await res.text();
  return { status: res.status, body: text ? JSON.parse(text) : null, headers: res.headers };
}

async function signIn(base: string): Promise<string> {
  const res = await fetch(`${base}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify(ENGINEER),
  });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status}`);
  // Only the access cookie is needed for the API (the refresh cookie is scoped to /api/auth).
  const access = res.headers.getSetCookie().find((c) => c.startsWith('rw_access='));
  if (!access) throw new Error('no rw_access cookie');
  return access.split(';')[0];
}

interface Target {
  route: string;
  method: 'GET' | 'POST';
  path: string;
  body?: unknown;
  cookie?: string;
}

async function run(base: string, target: Target, connections: number, seconds: number, maxRequests: number) {
  const cpuBefore = await serverCpuMicros();
  const result = await autocannon({
    url: base + target.path,
    method: target.method,
    connections,
    duration: seconds,
    maxOverallRequests: Math.max(maxRequests, connections),
    timeout: 30,
    headers: {
      'content-type': 'application/json',
      ...(target.cookie ? { cookie: target.cookie } : {}),
    },
    body: target.body === undefined ? undefined : JSON.stringify(target.body),
  });
  const cpuMicros = (await serverCpuMicros()) - cpuBefore;
  const answered = result['2xx'] + result.non2xx;
  const row: Row = {
    route: target.route,
    connections,
    requests: answered,
    seconds: result.duration,
    rps: answered / result.duration,
    p50: result.latency.p50,
    p99: result.latency.p99,
    errors: result.errors,
    timeouts: result.timeouts,
    non2xx: result.non2xx,
    cpuMs: answered > 0 ? cpuMicros / 1000 / answered : NaN,
  };
  return row;
}

const fmt = (n: number, digits = 1) => (Number.isFinite(n) ? n.toFixed(digits) : '—');
const load = () =>
  os
    .loadavg()
    .map((l) => l.toFixed(2))
    .join(' / ');

function table(rows: Row[]): string {
  const lines = [
    '| Route | Connections | Requests | Requests/s | p50 (ms) | p99 (ms) | Errors | Timeouts | Non-2xx | Server CPU ms/request |',
    '| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |',
  ];
  for (const r of rows)
    lines.push(
      `| ${r.route} | ${r.connections} | ${r.requests} | ${fmt(r.rps)} | ${fmt(r.p50)} | ${fmt(r.p99)} | ${r.errors} | ${r.timeouts} | ${r.non2xx} | ${fmt(r.cpuMs, 2)} |`,
    );
  return lines.join('\n');
}

async function main(): Promise<void> {
  console.log(`bench:api: ${os.cpus().length} CPUs (${os.cpus()[0]?.model ?? 'unknown'}), Node ${process.version}`);
  console.log(`load average (1/5/15 min) at start: ${load()}`);
  console.log(`runs: ${SECONDS} s each, at most ${MAX_REQUESTS} requests; connections ${CONNECTIONS.join(', ')}`);
  console.log(
    'The bench server turns off the per-user analysis rate limit (createApp analysisRateLimit: null) and the sign-in limits;\n' +
      'with them on, one user would be answered 429 after 600 analyses a minute and 10–30 sign-ins per 15 minutes.',
  );
  const { child, base } = await startServer();
  let failed = false;
  try {
    const cookie = await signIn(base);
    const presets = await json(base, '/api/presets', { cookie });
    const depot = (presets.body.items as { id: string; title: string; design: unknown }[]).find((p) =>
      /depot|800/i.test(`${p.id} ${p.title}`),
    );
    if (!depot) throw new Error('no depot charger preset');
    const designs = await json(base, '/api/designs', { cookie });
    if (designs.status !== 200 || designs.body.items.length === 0) throw new Error('the demo seed made no designs');

    const sizing = sizingRequest;
    const targets: Target[] = [
      { route: 'POST /api/auth/sign-in', method: 'POST', path: '/api/auth/sign-in', body: ENGINEER },
      { route: 'GET /api/designs', method: 'GET', path: '/api/designs', cookie },
      { route: 'POST /api/check', method: 'POST', path: '/api/check', body: { design: depot.design, includeWaveform: false }, cookie },
      { route: 'POST /api/precharge/size', method: 'POST', path: '/api/precharge/size', body: sizing, cookie },
    ];
    for (const t of targets) {
      const probe = await json(base, t.path, { method: t.method, body: t.body, cookie: t.cookie });
      if (probe.status !== 200) throw new Error(`${t.route} answers ${probe.status}: ${JSON.stringify(probe.body)}`);
    }

    const rows: Row[] = [];
    for (const t of targets) {
      await run(base, t, 10, 1, 500); // warm-up, not reported
      for (const connections of CONNECTIONS) {
        const row = await run(base, t, connections, SECONDS, MAX_REQUESTS);
        rows.push(row);
        console.log(
          `  ${row.route} × ${connections}: ${fmt(row.rps)} req/s, p50 ${fmt(row.p50)} ms, p99 ${fmt(row.p99)} ms, ` +
            `server CPU ${fmt(row.cpuMs, 2)} ms/request (load ${load()})`,
        );
      }
    }
    console.log('\n' + table(rows) + '\n');
    if (rows.some((r) => r.errors + r.timeouts + r.non2xx > 0)) failed = true;

    const check50 = rows.find((r) => r.route === 'POST /api/check' && r.connections === 50)!;
    const bestCheckRps = Math.max(...rows.filter((r) => r.route === 'POST /api/check').map((r) => r.rps));
    console.log(`target: single check p99 ≤ 50 ms at 50 connections: ${fmt(check50.p99)} ms → ${check50.p99 <= 50 ? 'met' : 'NOT met'}`);
    console.log(`target: ≥ 300 checks/s: best ${fmt(bestCheckRps)} checks/s → ${bestCheckRps >= 300 ? 'met' : 'NOT met'}`);
    const checkCpu = Math.min(...rows.filter((r) => r.route === 'POST /api/check').map((r) => r.cpuMs));
    console.log(
      `server CPU per check: ${fmt(checkCpu, 2)} ms, so one event loop with a whole core to itself could answer at most ` +
        `≈ ${fmt(1000 / checkCpu, 0)} checks/s`,
    );
    console.log(`load average after the route runs: ${load()}\n`);

    failed = (await healthDuringSpread(base, cookie)) || failed;
    console.log(`load average at the end: ${load()}`);
  } finally {
    child.kill('SIGTERM');
  }
  if (failed) {
    console.error('bench:api: some requests errored, timed out or answered other than 2xx (see the tables).');
    process.exitCode = 1;
  }
}

/** GET /api/health at 10 connections while a 100 000-sample spread runs; true when something failed. */
async function healthDuringSpread(base: string, cookie: string): Promise<boolean> {
  const health: Target = { route: 'GET /api/health', method: 'GET', path: '/api/health' };
  const idle = await run(base, health, 10, 5, MAX_REQUESTS);
  console.log(`health, server idle: p50 ${fmt(idle.p50)} ms, p99 ${fmt(idle.p99)} ms (${fmt(idle.rps)} req/s)`);

  const designs = await json(base, '/api/designs', { cookie });
  const depot = (designs.body.items as { name: string; latestRevisionId?: string | null; id: string }[]).find((d) =>
    /depot/i.test(d.name),
  );
  if (!depot) throw new Error('no demo depot charger design');
  const revisions = await json(base, `/api/designs/${depot.id}/revisions`, { cookie });
  const revisionId: string = revisions.body.items[0].id;
  const tolerances = {
    'capacitor.capacitance': { percent: 10, drift: -20 },
    'source.voltage': { min: '760 V', max: '840 V' },
    'precharge.resistance': { percent: 5 },
  };
  const start = await json(base, `/api/revisions/${revisionId}/analyses`, {
    method: 'POST',
    cookie,
    body: { kind: 'spread', options: { method: 'monte-carlo', samples: SPREAD_SAMPLES, seed: 20261201, tolerances } },
  });
  if (start.status !== 202) throw new Error(`spread did not queue: ${start.status} ${JSON.stringify(start.body)}`);
  const jobId: string = start.body.job.id;
  const job = () => json(base, `/api/analysis-jobs/${jobId}`, { cookie }).then((r) => r.body as { state: string; done: number; total: number });

  // Wait until the spread is running (the worker polls for jobs).
  const waitStart = Date.now();
  let state = await job();
  while (state.state === 'queued' && Date.now() - waitStart < 30_000) {
    await new Promise((r) => setTimeout(r, 100));
    state = await job();
  }
  if (state.state !== 'running') {
    console.log(`spread job did not start running (state ${state.state}); health under load not measured`);
    return true;
  }

  // Hammer health; sample the job's state every 250 ms on the side.
  const samples: { state: string; done: number }[] = [];
  let sampling = true;
  const sampler = (async () => {
    while (sampling) {
      const s = await job();
      samples.push({ state: s.state, done: s.done });
      if (s.state !== 'running') break;
      await new Promise((r) => setTimeout(r, 250));
    }
  })();
  const busy = await run(base, health, 10, HEALTH_SECONDS, 1_000_000);
  sampling = false;
  await sampler;
  const after = await job();
  const runningThroughout = samples.length > 0 && samples.every((s) => s.state === 'running') && after.state === 'running';
  console.log(
    `health during the spread: p50 ${fmt(busy.p50)} ms, p99 ${fmt(busy.p99)} ms (${fmt(busy.rps)} req/s, ${busy.requests} requests, ` +
      `${busy.errors} errors, ${busy.non2xx} non-2xx)`,
  );
  console.log(
    `spread: ${samples.length} state samples, ${runningThroughout ? 'running throughout' : 'NOT running throughout'}; ` +
      `progress ${samples[0]?.done ?? 0} → ${after.done} of ${after.total} samples during ${fmt(busy.seconds)} s (state now ${after.state})`,
  );
  console.log(`target: health p99 < 20 ms during a 100 000-sample spread: ${busy.p99 < 20 ? 'met' : 'NOT met'}`);
  console.log('\n' + table([{ ...idle, route: 'GET /api/health (idle)' }, { ...busy, cpuMs: NaN, route: 'GET /api/health (spread running)' }]) + '\n');
  if (after.state === 'running' || after.state === 'queued') {
    await json(base, `/api/analysis-jobs/${jobId}/cancel`, { method: 'POST', cookie });
    console.log('the spread was cancelled after the measurement');
  }
  return busy.errors + busy.timeouts + busy.non2xx + idle.errors + idle.timeouts + idle.non2xx > 0;
}

if (process.argv.includes('--serve')) {
  serve().catch((error) => {
    console.error(error);
    process.exit(1);
  });
} else {
  main().catch((error) => {
    console.error(error);
    process.exitCode = 1;
  });
}
