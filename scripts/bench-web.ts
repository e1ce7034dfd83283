/**
 * Web delivery check: builds the app, starts the built server (dist/api/server.js) on a fresh SQLite
 * file, runs Lighthouse RUNS times on / and /sift with its mobile defaults (a mid-range phone on a
 * slow 4G link, simulated), and prints the median of each figure per page. It then counts the bytes
 * of the response bodies as they came over the wire (compressed size, every request the page and its
 * service worker made, the edition bundle included) for a first and a repeat visit of /sift in
 * Chromium.
 *
 * Goals (a page that feels instant on a phone with poor signal; Lighthouse's own "good" bands for
 * the scores, web.dev's Core Web Vitals thresholds for CLS and LCP): performance ≥ 95, accessibility
 * and best practices 100, CLS ≤ 0.02, LCP ≤ 2.5 s, TBT ≤ 150 ms; a first visit of /sift under
 * 350 kB with the edition, a repeat visit under 10 kB (common practice, no source, for the last two).
 *
 *   npm run bench:web                   build, then measure
 *   npm run bench:web -- --no-build     measure the build already in dist/
 *   BENCH_RUNS=5 npm run bench:web      more Lighthouse runs per page (default 3)
 */
import { execSync, spawn } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import * as chromeLauncher from 'chrome-launcher';
import lighthouse from 'lighthouse';
import { chromium, type Page } from 'playwright-core';

const CHROME_PATH = process.env['CHROME_PATH'] ?? '/usr/bin/chromium';
const RUNS = Number(process.env['BENCH_RUNS'] ?? 3);
const PAGES = ['/', '/sift'];
const CHROME_FLAGS = [
  '--headless=new',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
];
/** a Lighthouse run that ends with one of these trace errors says nothing about the page: run it again */
const RETRIED_ERRORS = new Set(['NO_NAVSTART', 'NO_FCP']);
const MOST_TRIES = 4;

const GOALS = {
  performance: { at: 95, higherIsBetter: true },
  accessibility: { at: 100, higherIsBetter: true },
  bestPractices: { at: 100, higherIsBetter: true },
  cls: { at: 0.02, higherIsBetter: false },
  lcpMs: { at: 2500, higherIsBetter: false },
  tbtMs: { at: 150, higherIsBetter: false },
} as const;
const FIRST_VISIT_GOAL_BYTES = 350_000;
const REPEAT_VISIT_GOAL_BYTES = 10_000;

type Figure = keyof typeof GOALS;
type Figures = Record<Figure, number>;

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

/** Starts the built server in a child process on a fresh database; resolves with its base URL once it listens. */
async function startBuiltServer(directory: string): Promise<{ base: string; stop: () => Promise<void> }> {
  const child = spawn(process.execPath, ['dist/api/server.js'], {
    env: {
      ...process.env,
      NODE_ENV: 'development',
      PORT: '0',
      DATABASE_URL: `sqlite:${path.join(directory, 'bench-web.sqlite')}`,
      UPLOADS_DIR: path.join(directory, 'uploads'),
      LOG_LEVEL: 'silent',
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
        resolve(match[1]);
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

/** One Lighthouse run in a fresh Chromium (mobile defaults, simulated throttling). */
async function lighthouseOnce(url: string): Promise<Figures> {
  for (let attempt = 1; ; attempt++) {
    const chrome = await chromeLauncher.launch({ chromePath: CHROME_PATH, chromeFlags: CHROME_FLAGS });
    try {
      const result = await lighthouse(url, {
        port: chrome.port,
        output: 'json',
        logLevel: 'error',
        onlyCategories: ['performance', 'accessibility', 'best-practices'],
      });
      const lhr = result?.lhr;
      const error = lhr?.runtimeError?.code;
      if (!lhr || (error && RETRIED_ERRORS.has(error))) {
        if (attempt < MOST_TRIES) continue;
        throw new Error(`Lighthouse on ${url} failed ${MOST_TRIES} times (${error ?? 'no report'})`);
      }
      if (error) throw new Error(`Lighthouse on ${url}: ${error} ${lhr.runtimeError?.message ?? ''}`);
      const score = (id: string): number => Math.round((lhr.categories[id]?.score ?? 0) * 100);
      const audit = (id: string): number => lhr.audits[id]?.numericValue ?? Number.NaN;
      return {
        performance: score('performance'),
        accessibility: score('accessibility'),
        bestPractices: score('best-practices'),
        cls: audit('cumulative-layout-shift'),
        lcpMs: audit('largest-contentful-paint'),
        tbtMs: audit('total-blocking-time'),
      };
    } finally {
      chrome.kill();
    }
  }
}

interface VisitBytes {
  total: number;
  requests: number;
  edition: number;
  largest: Array<{ url: string; bytes: number }>;
}

/**
 * Bytes of response bodies as transferred (after Content-Encoding) during a first visit of /sift in a
 * fresh profile, and during a second visit in the same profile once its service worker is in charge.
 * Service-worker requests are counted too; cached answers count what (little) they fetched.
 */
async function transferOfSift(base: string): Promise<{ first: VisitBytes; repeat: VisitBytes }> {
  const browser = await chromium.launch({ executablePath: CHROME_PATH, headless: true, args: CHROME_FLAGS.slice(1) });
  try {
    const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
    let log: Array<{ url: string; bytes: number }> = [];
    context.on('requestfinished', (request) => {
      void request
        .sizes()
        .then((sizes) => log.push({ url: request.url(), bytes: sizes.responseBodySize }))
        .catch(() => undefined);
    });
    const settle = async (page: Page): Promise<void> => {
      await page.locator('sv-shortlist').first().waitFor({ timeout: 30_000 });
      await page.waitForLoadState('networkidle');
      // the service worker keeps fetching (its prefetch) after the page is idle
      await page.waitForTimeout(4_000);
      await page.waitForLoadState('networkidle');
    };
    const sum = (): VisitBytes => {
      const entries = log.filter((entry) => entry.bytes > 0);
      return {
        total: entries.reduce((total, entry) => total + entry.bytes, 0),
        requests: log.length,
        edition: entries.filter((entry) => entry.url.includes('/editions/current/bundle')).reduce((total, entry) => total + entry.bytes, 0),
        largest: [...entries].sort((a, b) => b.bytes - a.bytes).slice(0, 6),
      };
    };
    const page = await context.newPage();
    await page.goto(`${base}/sift`);
    await settle(page);
    await page.evaluate('navigator.serviceWorker.ready.then(() => true)');
    await page.waitForTimeout(2_000);
    const first = sum();
    log = [];
    await page.goto(`${base}/sift`);
    await settle(page);
    const repeat = sum();
    return { first, repeat };
  } finally {
    await browser.close();
  }
}

function verdict(figure: Figure, value: number): string {
  const goal = GOALS[figure];
  return (goal.higherIsBetter ? value >= goal.at : value <= goal.at) ? 'ok' : `MISSES ${goal.higherIsBetter ? '≥' : '≤'} ${goal.at}`;
}

function format(figure: Figure, value: number): string {
  if (figure === 'cls') return value.toFixed(3);
  if (figure === 'lcpMs' || figure === 'tbtMs') return `${Math.round(value)} ms`;
  return String(value);
}

async function main(): Promise<void> {
  if (!process.argv.includes('--no-build')) execSync('npm run build', { stdio: 'inherit' });
  const directory = await mkdtemp(path.join(tmpdir(), 'sylvasift-bench-web-'));
  const server = await startBuiltServer(directory);
  let failed = false;
  try {
    console.log(`\nLighthouse ${RUNS}× per page against ${server.base} (mobile defaults, medians)\n`);
    for (const pagePath of PAGES) {
      const runs: Figures[] = [];
      for (let run = 0; run < RUNS; run++) runs.push(await lighthouseOnce(`${server.base}${pagePath}`));
      console.log(`${pagePath}`);
      for (const figure of Object.keys(GOALS) as Figure[]) {
        const value = median(runs.map((r) => r[figure]));
        const said = verdict(figure, value);
        failed ||= said !== 'ok';
        const each = runs.map((r) => format(figure, r[figure])).join(', ');
        console.log(`  ${figure.padEnd(14)} ${format(figure, value).padStart(9)}   ${said.padEnd(14)} (runs: ${each})`);
      }
    }
    const { first, repeat } = await transferOfSift(server.base);
    const kB = (bytes: number): string => `${(bytes / 1000).toFixed(1)} kB`;
    console.log('\nBytes on the wire for /sift (response bodies, compressed)');
    for (const [label, visit, goal] of [
      ['first visit', first, FIRST_VISIT_GOAL_BYTES],
      ['repeat visit', repeat, REPEAT_VISIT_GOAL_BYTES],
    ] as const) {
      const ok = visit.total <= goal;
      failed ||= !ok;
      console.log(
        `  ${label.padEnd(13)} ${kB(visit.total).padStart(9)}   ${ok ? 'ok' : `MISSES ≤ ${kB(goal)}`}  (${visit.requests} requests, edition ${kB(visit.edition)})`,
      );
      for (const entry of visit.largest) console.log(`      ${kB(entry.bytes).padStart(9)}  ${entry.url.replace(server.base, '')}`);
    }
  } finally {
    await server.stop();
    await rm(directory, { recursive: true, force: true });
  }
  console.log(failed ? '\nSome goals are missed.' : '\nEvery goal is met.');
  process.exitCode = failed ? 1 : 0;
}

await main();
