/**
 * API throughput check: starts the app on an ephemeral loopback port with the reference edition,
 * measures GET /api/health (the floor: Express plus one trivial query) and POST /api/v1/identify with
 * a typical five-observation sift, and checks that the partner-key limiter answers 429 exactly past
 * its quota under concurrency.
 *
 * Pass bar: identify reaches at least half the floor's requests/s, with p99 under 50 ms, at
 * CONNECTIONS concurrent connections. Load generator and server share the machine's cores, so the
 * ratio matters more than the absolute numbers.
 *
 * Default concurrency 8: load generator and server run on one JavaScript thread, so every request in
 * flight waits for the others' CPU time and latency grows with the connection count, not with the
 * server's speed (16 connections × ~1.7 ms per identify already puts the mean near 27 ms and the
 * tail past 50 ms on a noisy machine). Eight connections still keep that thread busy (identify's
 * requests/s is the same as at 16), so throughput is measured at saturation and p99 still says
 * something about the server.
 *
 * The same two measurements are then repeated against the server in a process of its own (started
 * from api/src/server.ts on a fresh SQLite file), so the load generator no longer shares its thread:
 * the stricter reading, since the generator's own cost per request no longer pads both sides alike.
 * Both set-ups run identify on as many worker threads as the server starts by default on this
 * machine (IDENTIFY_WORKERS); a last run with none shows what the workers add, outside the verdict.
 *
 * The floor and identify are measured in turns (BENCH_ROUNDS, default 4, of BENCH_SECONDS / ROUNDS
 * each), so that a busy spell on a shared machine falls on both rather than on one of them.
 *
 *   BENCH_CONNECTIONS=16 npm run bench:api   measures at another concurrency (default 8)
 *   npm run bench:api -- --profile   also writes a CPU profile of the request thread during one more identify run
 *                                    (first set-up) to bench-identify.cpuprofile
 */
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Session } from 'node:inspector/promises';
import { createRequire } from 'node:module';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { createApp, type CreatedApp } from '../api/src/app';
import { defaultIdentifyWorkers, loadConfig } from '../api/src/config';

/** Concurrent connections for both measurements (BENCH_CONNECTIONS overrides). */
const CONNECTIONS = Number(process.env['BENCH_CONNECTIONS'] ?? 8);
const DURATION_S = Number(process.env['BENCH_SECONDS'] ?? 8);
/** turns the floor and identify take, each DURATION_S / ROUNDS seconds long */
const ROUNDS = Number(process.env['BENCH_ROUNDS'] ?? 4);
/** identify worker threads, as the server would start them on this machine */
const WORKERS = defaultIdentifyWorkers();
const LIMITER_QUOTA = 50;
const LIMITER_REQUESTS = 80;
const PROFILE = process.argv.includes('--profile');

interface AutocannonResult {
  requests: { average: number; total: number };
  latency: { p50: number; p99: number; average: number };
  errors: number;
  non2xx: number;
  /** seconds the run lasted */
  duration: number;
  statusCodeStats?: Record<string, { count: number }>;
}
interface AutocannonOptions {
  url: string;
  connections: number;
  duration?: number;
  amount?: number;
  method?: string;
  headers?: Record<string, string>;
  body?: string;
}
/** A run in progress: a promise of its result that also reports each response with its latency in ms. */
type AutocannonRun = Promise<AutocannonResult> & {
  on(event: 'response', listener: (client: unknown, statusCode: number, bytes: number, milliseconds: number) => void): void;
};
type Autocannon = (options: AutocannonOptions) => AutocannonRun;
const autocannon = createRequire(import.meta.url)('autocannon') as Autocannon;

// Loblolly pine seen in summer: needle foliage, 3 needles per bundle, 6-inch needles, alternate, furrowed bark.
const TYPICAL_SIFT = JSON.stringify({
  observations: [
    { trait: 'foliage', values: ['needle'] },
    { trait: 'needles-per-fascicle', values: [3] },
    { trait: 'needle-length', value: 6, unit: 'in' },
    { trait: 'leaf-arrangement', values: ['alternate'] },
    { trait: 'bark-texture', values: ['furrowed', 'plated'] },
  ],
  season: 'leaf-on',
  leeway: 2,
  limit: 10,
});

async function listen(created: CreatedApp): Promise<{ server: Server; base: string }> {
  return new Promise((resolve) => {
    const server = created.app.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as AddressInfo;
      resolve({ server, base: `http://127.0.0.1:${port}` });
    });
  });
}

async function postJson(url: string, body: unknown, token?: string): Promise<Record<string, unknown>> {
  const response = await fetch(url, {
    method: 'POST',
    headers: { 'content-type': 'application/json', ...(token ? { authorization: `Bearer ${token}` } : {}) },
    body: JSON.stringify(body),
  });
  const answer = (await response.json()) as Record<string, unknown>;
  if (!response.ok) throw new Error(`${url}: ${response.status} ${JSON.stringify(answer)}`);
  return answer;
}

/** Signs a bench user up and in, and gives them a partner key with the identify scope. */
async function partnerKey(base: string, label: string): Promise<string> {
  const email = `bench-${label}-${process.pid}@example.invalid`;
  const password = 'bench password long enough';
  await postJson(`${base}/api/v1/accounts`, { email, password, displayName: `Bench ${label}` });
  const session = await postJson(`${base}/api/v1/sessions`, { email, password });
  const key = await postJson(`${base}/api/v1/keys`, { name: `bench ${label}`, scopes: ['identify', 'lookup'] }, session['token'] as string);
  return key['key'] as string;
}

/** Runs `work`, recording a CPU profile of this process (server and load generator) when --profile is given. */
async function profiled<T>(file: string, work: () => Promise<T>): Promise<T> {
  if (!PROFILE) return work();
  const session = new Session();
  session.connect();
  await session.post('Profiler.enable');
  await session.post('Profiler.start');
  try {
    return await work();
  } finally {
    const { profile } = await session.post('Profiler.stop');
    await writeFile(file, JSON.stringify(profile));
    session.disconnect();
    console.log(`CPU profile of the identify run written to ${file}`);
  }
}

/** One turn of a measurement: autocannon's summary and every response's latency. */
interface Slice {
  result: AutocannonResult;
  latencies: number[];
}

async function slice(options: AutocannonOptions): Promise<Slice> {
  const latencies: number[] = [];
  const run = autocannon(options);
  run.on('response', (_client, _status, _bytes, milliseconds) => latencies.push(milliseconds));
  return { result: await run, latencies };
}

/** A measurement's numbers over all its turns. */
interface Measured {
  requestsPerSecond: number;
  /** percentiles of every response's latency in all turns (nearest rank), in ms */
  p50: number;
  p99: number;
  failed: number;
}

function percentile(sorted: readonly number[], share: number): number {
  return sorted.length === 0 ? Number.NaN : sorted[Math.min(sorted.length - 1, Math.ceil(share * sorted.length) - 1)];
}

function summarise(slices: Slice[]): Measured {
  const requests = slices.reduce((sum, { result }) => sum + result.requests.total, 0);
  const seconds = slices.reduce((sum, { result }) => sum + result.duration, 0);
  const latencies = slices.flatMap((item) => item.latencies).sort((a, b) => a - b);
  return {
    requestsPerSecond: requests / seconds,
    p50: percentile(latencies, 0.5),
    p99: percentile(latencies, 0.99),
    failed: slices.reduce((sum, { result }) => sum + result.non2xx + result.errors, 0),
  };
}

function describe(name: string, result: Measured): string {
  const ms = (value: number) => value.toFixed(1).padStart(5);
  return `${name.padEnd(24)} ${result.requestsPerSecond.toFixed(0).padStart(6)} req/s   p50 ${ms(result.p50)} ms   p99 ${ms(result.p99)} ms   failed ${result.failed}`;
}

/**
 * Warms up, then measures the floor and identify at CONNECTIONS connections in ROUNDS turns each
 * (floor, identify, floor, identify, …) so that a busy spell on the shared machine slows both alike,
 * and prints both; true when identify reaches half the floor's requests/s with p99 under 50 ms and
 * nothing failed. With `profile`, one more identify run is recorded to bench-identify.cpuprofile.
 */
async function measureBoth(base: string, key: string, setup: string, profile: boolean): Promise<boolean> {
  const headers = { 'content-type': 'application/json', authorization: `Bearer ${key}` };
  const identifyFor = (duration: number) =>
    slice({ url: `${base}/api/v1/identify`, connections: CONNECTIONS, duration, method: 'POST', headers, body: TYPICAL_SIFT });
  // Warm up: compiles the edition (in every identify worker) and lets the JIT settle.
  await autocannon({ url: `${base}/api/v1/identify`, connections: CONNECTIONS, amount: 800, method: 'POST', headers, body: TYPICAL_SIFT });
  await autocannon({ url: `${base}/api/health`, connections: 4, amount: 400 });

  const turn = DURATION_S / ROUNDS;
  const floorSlices: Slice[] = [];
  const identifySlices: Slice[] = [];
  for (let round = 0; round < ROUNDS; round++) {
    floorSlices.push(await slice({ url: `${base}/api/health`, connections: CONNECTIONS, duration: turn }));
    identifySlices.push(await identifyFor(turn));
  }
  if (profile) await profiled('bench-identify.cpuprofile', () => identifyFor(turn));
  const floor = summarise(floorSlices);
  const identify = summarise(identifySlices);
  const ratio = identify.requestsPerSecond / floor.requestsPerSecond;
  console.log(`\nconcurrency ${CONNECTIONS} connections, ${ROUNDS} turns of ${turn} s each, ${setup}\n`);
  console.log(describe('GET /api/health (floor)', floor));
  console.log(describe('POST /api/v1/identify', identify));
  console.log(`\nidentify / floor throughput: ${ratio.toFixed(2)} (needs ≥ 0.50); identify p99 ${identify.p99.toFixed(1)} ms (needs < 50)`);
  const clean = identify.failed === 0 && floor.failed === 0;
  if (!clean) console.log('some requests failed; see "failed" above');
  return clean && ratio >= 0.5 && identify.p99 < 50;
}

async function throughput(): Promise<boolean> {
  const created = await createApp(
    loadConfig({
      NODE_ENV: 'test',
      LOG_LEVEL: 'silent',
      VALIDATE_RESPONSES: 'false',
      KEY_PER_MINUTE: '1000000',
      KEY_DAILY_QUOTA: '100000000',
      IDENTIFY_WORKERS: String(WORKERS),
    }),
  );
  const { server, base } = await listen(created);
  try {
    const key = await partnerKey(base, 'throughput');
    return await measureBoth(base, key, `one process on loopback, ${workersText(WORKERS)}`, PROFILE);
  } finally {
    server.close();
    await created.close();
  }
}

/** Fires more requests than a key's per-minute limit allows, all at once, and counts the answers. */
async function limiterHoldsUnderConcurrency(): Promise<boolean> {
  const created = await createApp(
    loadConfig({
      NODE_ENV: 'test',
      LOG_LEVEL: 'silent',
      VALIDATE_RESPONSES: 'false',
      KEY_PER_MINUTE: String(LIMITER_QUOTA),
      IDENTIFY_WORKERS: String(WORKERS),
    }),
  );
  const { server, base } = await listen(created);
  try {
    const key = await partnerKey(base, 'limiter');
    const headers = { 'content-type': 'application/json', authorization: `Bearer ${key}` };
    const result = await autocannon({
      url: `${base}/api/v1/identify`,
      connections: CONNECTIONS,
      amount: LIMITER_REQUESTS,
      method: 'POST',
      headers,
      body: TYPICAL_SIFT,
    });
    const stats = result.statusCodeStats ?? {};
    const ok = stats['200']?.count ?? 0;
    const limited = stats['429']?.count ?? 0;
    console.log(
      `\nrate limiter: ${LIMITER_REQUESTS} identify calls on one key limited to ${LIMITER_QUOTA}/minute, ${CONNECTIONS} at a time → ${ok} × 200, ${limited} × 429`,
    );
    const exact = ok === LIMITER_QUOTA && limited === LIMITER_REQUESTS - LIMITER_QUOTA;
    console.log(exact ? 'the limiter answers 429 exactly past the quota' : 'the limiter did NOT stop exactly at the quota');
    return exact;
  } finally {
    server.close();
    await created.close();
  }
}

/** Starts api/src/server.ts in a child process on a fresh database and resolves once it listens. */
async function startServerProcess(key: string, directory: string, workers: number): Promise<{ base: string; stop: () => Promise<void> }> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'api/src/server.ts'], {
    env: {
      ...process.env,
      NODE_ENV: 'development',
      PORT: '0',
      DATABASE_URL: `sqlite:${path.join(directory, 'bench.sqlite')}`,
      LOG_LEVEL: 'silent',
      DEMO_PARTNER_KEY: key,
      KEY_PER_MINUTE: '1000000',
      KEY_DAILY_QUOTA: '100000000',
      IDENTIFY_WORKERS: String(workers),
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  const base = await new Promise<string>((resolve, reject) => {
    let seen = '';
    const timer = setTimeout(() => reject(new Error(`the server did not start in time:\n${seen}`)), 120_000);
    const read = (chunk: Buffer): void => {
      seen += chunk.toString();
      const match = /running at (http:\/\/localhost:\d+)/.exec(seen);
      if (match) {
        clearTimeout(timer);
        resolve(match[1].replace('localhost', '127.0.0.1'));
      }
    };
    child.stdout.on('data', read);
    child.stderr.on('data', read);
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`the server exited with ${code}:\n${seen}`));
    });
  });
  return {
    base,
    stop: async () => {
      child.kill('SIGTERM');
      await exited;
    },
  };
}

function workersText(workers: number): string {
  return workers === 0 ? 'identify on the request thread' : `${workers} identify worker${workers === 1 ? '' : 's'}`;
}

/** Health and identify against the server in its own process: the load generator keeps this one. */
async function throughputSeparate(workers: number, note = ''): Promise<boolean> {
  const directory = await mkdtemp(path.join(tmpdir(), 'sylvasift-bench-'));
  const key = `svk_${randomBytes(24).toString('base64url')}`;
  const server = await startServerProcess(key, directory, workers);
  try {
    return await measureBoth(server.base, key, `the server in a process of its own on loopback, ${workersText(workers)}${note}`, false);
  } finally {
    await server.stop();
    await rm(directory, { recursive: true, force: true });
  }
}

const fast = await throughput();
const limited = await limiterHoldsUnderConcurrency();
const separate = await throughputSeparate(WORKERS);
// the same server answering identify on its request thread, to show what the workers bring (not part of the verdict)
if (WORKERS > 0) await throughputSeparate(0, ' (for comparison only)');
console.log(
  `\n${fast ? 'PASS' : 'FAIL'} throughput and latency with the load generator in the server's process; ${separate ? 'PASS' : 'FAIL'} with the server in its own; ${limited ? 'PASS' : 'FAIL'} rate limit`,
);
process.exit(fast && separate && limited ? 0 : 1);
