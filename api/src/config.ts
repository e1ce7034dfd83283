import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { readPeopleConfig, type PeopleConfig } from './accounts/people-config';

/** Where the running code sits: the repo root both from source (tsx) and from the bundle in dist/api. */
export const REPO_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

export type Environment = 'development' | 'test' | 'production';

export interface AppConfig {
  /** development prints demo accounts and starts the local mail catcher; production never does */
  env: Environment;
  /** TCP port the HTTP server listens on */
  port: number;
  /** `sqlite:<path>` (relative to the working directory), `sqlite::memory:`, or a postgres:// URL */
  databaseUrl: string;
  /** pino level: fatal, error, warn, info, debug, trace or silent */
  logLevel: string;
  /** folder with the built Angular app, served with history fallback */
  webRoot: string;
  /** the application's version, reported by /api/health */
  version: string;
  /** run migrations (and, on an empty database, the seeders) when the server starts */
  migrateOnStart: boolean;
  /** folder for uploaded photos, outside the web root; files there have random names */
  uploadsDir: string;
  /** check every JSON response against openapi.yaml and record mismatches (on by default in test) */
  validateResponses: boolean;
  /** worker threads that answer identify calls; 0 answers them on the request thread */
  identifyWorkers: number;
  /** accounts, sessions, sign-in throttling, partner keys, rate limits, mail, backups and the demo scenario */
  people: PeopleConfig;
}

/** Most identify workers the default starts; past this the request thread, not the engine, is the limit. */
const MOST_DEFAULT_IDENTIFY_WORKERS = 4;

/** One identify worker per core beyond the one the request thread needs, at most four; none on one core. */
export function defaultIdentifyWorkers(cores = os.availableParallelism()): number {
  return Math.max(0, Math.min(MOST_DEFAULT_IDENTIFY_WORKERS, cores - 1));
}

export class ConfigError extends Error {
  constructor(readonly problems: string[]) {
    super(`Invalid configuration:\n  - ${problems.join('\n  - ')}`);
    this.name = 'ConfigError';
  }
}

const LOG_LEVELS = new Set(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']);
const ENVIRONMENTS = new Set<Environment>(['development', 'test', 'production']);

function readVersion(): string {
  // Set by npm when started through an npm script; the bundle also embeds it at build time.
  return process.env['npm_package_version'] ?? process.env['SYLVASIFT_VERSION'] ?? '0.1.0';
}

/** Reads the configuration once from the environment, with defaults for local use; throws ConfigError listing every problem. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): AppConfig {
  const problems: string[] = [];
  const nodeEnv = (env['NODE_ENV'] ?? 'development') as Environment;
  if (!ENVIRONMENTS.has(nodeEnv)) problems.push(`NODE_ENV must be development, test or production (got "${nodeEnv}")`);

  const portText = env['PORT'] ?? '3000';
  const port = Number(portText);
  if (!Number.isInteger(port) || port < 0 || port > 65535) problems.push(`PORT must be an integer 0–65535 (got "${portText}")`);

  const databaseUrl = env['DATABASE_URL'] ?? (nodeEnv === 'test' ? 'sqlite::memory:' : 'sqlite:data/sylvasift.sqlite');
  if (!/^(sqlite:|postgres(ql)?:\/\/)/.test(databaseUrl)) problems.push(`DATABASE_URL must start with sqlite: or postgres:// (got "${databaseUrl}")`);

  const logLevel = env['LOG_LEVEL'] ?? (nodeEnv === 'test' ? 'silent' : 'info');
  if (!LOG_LEVELS.has(logLevel)) problems.push(`LOG_LEVEL must be one of ${[...LOG_LEVELS].join(', ')} (got "${logLevel}")`);

  const migrateText = env['MIGRATE_ON_START'] ?? 'true';
  if (migrateText !== 'true' && migrateText !== 'false') problems.push(`MIGRATE_ON_START must be true or false (got "${migrateText}")`);

  const validateResponsesText = env['VALIDATE_RESPONSES'] ?? (nodeEnv === 'test' ? 'true' : 'false');
  if (validateResponsesText !== 'true' && validateResponsesText !== 'false') {
    problems.push(`VALIDATE_RESPONSES must be true or false (got "${validateResponsesText}")`);
  }
  // Test apps answer on the request thread unless a test asks for workers: they start many apps.
  const workersText = env['IDENTIFY_WORKERS'] || String(nodeEnv === 'test' ? 0 : defaultIdentifyWorkers());
  const identifyWorkers = Number(workersText);
  if (!/^\d+$/.test(workersText) || identifyWorkers > 64) problems.push(`IDENTIFY_WORKERS must be an integer 0–64 (got "${workersText}")`);
  // Each test app gets its own uploads folder so parallel runs never share files.
  const defaultUploads = nodeEnv === 'test' ? path.join(os.tmpdir(), `sylvasift-uploads-${process.pid}`) : 'data/uploads';

  const people = readPeopleConfig(env, nodeEnv, problems);

  if (problems.length > 0) throw new ConfigError(problems);
  return Object.freeze({
    env: nodeEnv,
    port,
    databaseUrl,
    logLevel,
    webRoot: path.resolve(env['WEB_ROOT'] ?? path.join(REPO_ROOT, 'dist/web')),
    version: readVersion(),
    migrateOnStart: migrateText === 'true',
    uploadsDir: path.resolve(env['UPLOADS_DIR'] ?? defaultUploads),
    validateResponses: validateResponsesText === 'true',
    identifyWorkers,
    people,
  });
}
