import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';

/**
 * A throwaway PostgreSQL server for the test suites: `initdb` into a temporary folder, `pg_ctl start`
 * on a free port, and everything removed again on `stop()`. PostgreSQL refuses to run as root, so
 * as root the server runs as the `postgres` system user (created when missing).
 */
export interface PostgresServer {
  /** the PostgreSQL version `initdb --version` reports */
  version: string;
  port: number;
  /** a `postgres://` URL for one database on this server (trust authentication, no password) */
  url(database: string): string;
  stop(): void;
}

/** Where PostgreSQL's server programs live: on PATH (a wrapper in /usr/local/bin) or Debian's versioned folder. */
export function findPostgresBin(): string | undefined {
  const candidates = (process.env['PATH'] ?? '').split(path.delimiter).filter(Boolean);
  candidates.push('/usr/local/bin');
  const debian = '/usr/lib/postgresql';
  if (fs.existsSync(debian)) {
    const versions = fs
      .readdirSync(debian)
      .filter((v) => /^\d+$/.test(v))
      .sort((a, b) => Number(b) - Number(a));
    candidates.push(...versions.map((v) => path.join(debian, v, 'bin')));
  }
  return candidates.find((dir) => fs.existsSync(path.join(dir, 'initdb')) && fs.existsSync(path.join(dir, 'pg_ctl')));
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      server.close(() => (typeof address === 'object' && address ? resolve(address.port) : reject(new Error('no port'))));
    });
  });
}

const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;

/** Runs a server program, as the postgres user when we are root. */
function runAsServerUser(bin: string, program: string, args: string[]): string {
  const file = path.join(bin, program);
  const [command, commandArgs] = isRoot ? ['runuser', ['-u', 'postgres', '--', file, ...args]] : [file, args];
  return execFileSync(command, commandArgs, { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
}

function ensureServerUser(): void {
  if (!isRoot) return;
  if (spawnSync('id', ['-u', 'postgres'], { stdio: 'ignore' }).status === 0) return;
  execFileSync('useradd', ['--system', '--no-create-home', '--shell', '/usr/sbin/nologin', 'postgres'], { stdio: 'ignore' });
}

/** Starts a new server; throws when the programs are missing or the server does not come up. */
export async function startPostgresServer(): Promise<PostgresServer> {
  const bin = findPostgresBin();
  if (!bin) throw new Error('PostgreSQL server programs (initdb, pg_ctl) not found on PATH or in /usr/lib/postgresql/*/bin');
  ensureServerUser();
  const root = fs.mkdtempSync(path.join(os.tmpdir(), 'sylvasift-pg-'));
  const data = path.join(root, 'data');
  if (isRoot) execFileSync('chown', ['postgres', root]);
  const port = await freePort();
  const version = runAsServerUser(bin, 'initdb', ['--version']).trim();
  try {
    runAsServerUser(bin, 'initdb', ['-D', data, '-A', 'trust', '-U', 'postgres', '-E', 'UTF8', '--locale=C.UTF-8', '--no-sync']);
    // A test server keeps nothing: skip the disk flushes; TCP on loopback only, the socket in our own folder.
    const options = [
      `-p ${port}`,
      `-k ${root}`,
      '-c listen_addresses=127.0.0.1',
      '-c fsync=off',
      '-c synchronous_commit=off',
      '-c full_page_writes=off',
      '-c max_connections=200',
    ];
    runAsServerUser(bin, 'pg_ctl', ['-D', data, '-o', options.join(' '), '-l', path.join(root, 'server.log'), '-w', '-t', '60', 'start']);
  } catch (error) {
    const log = path.join(root, 'server.log');
    const detail = fs.existsSync(log) ? fs.readFileSync(log, 'utf8') : '';
    fs.rmSync(root, { recursive: true, force: true });
    const stderr = (error as { stderr?: string }).stderr ?? '';
    throw new Error(`PostgreSQL test server did not start: ${(error as Error).message}\n${stderr}\n${detail}`);
  }
  let stopped = false;
  return {
    version,
    port,
    url: (database) => `postgres://postgres@127.0.0.1:${port}/${database}`,
    stop() {
      if (stopped) return;
      stopped = true;
      try {
        runAsServerUser(bin, 'pg_ctl', ['-D', data, '-m', 'immediate', '-w', 'stop']);
      } finally {
        fs.rmSync(root, { recursive: true, force: true });
      }
    },
  };
}
