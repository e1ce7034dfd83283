import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { AuthConfig } from './accounts/auth-config';
import type { LimitsConfig } from './gate/rate-limits';
import type { MailConfig } from './mail/mailer';

/** Where the running code sits: the repo root both from source (tsx) and from the bundle in dist/api. */
export const REPO_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

/** The API contract. */
export const OPENAPI_PATH = path.join(REPO_ROOT, 'openapi.yaml');

export type Environment = 'development' | 'test' | 'production';

/** The whole configuration, in one section per part of the app; each part receives only its section. */
export interface AppConfig {
  /** development prints demo accounts and starts the local mail catcher; production never does */
  env: Environment;
  /** TCP port the HTTP server listens on */
  port: number;
  /** pino level: fatal, error, warn, info, debug, trace or silent */
  logLevel: string;
  /** the application's version, reported by /api/health */
  version: string;
  database: {
    /** `sqlite:<path>` (relative to the working directory), `sqlite::memory:`, or a postgres:// URL */
    url: string;
    /** run migrations (and, on an empty database, the seeders) when the server starts */
    migrateOnStart: boolean;
  };
  storage: {
    /** folder for uploaded photos, outside the web root; files there have random names */
    uploadsDir: string;
    /** folder for SQLite snapshots */
    backupDir: string;
  };
  site: {
    /** folder with the built Angular app, served with history fallback */
    webRoot: string;
  };
  contract: {
    /** openapi.yaml, the API contract requests are validated against */
    openApiFile: string;
    /** check every JSON response against openapi.yaml and record mismatches (on by default in test) */
    validateResponses: boolean;
  };
  identify: {
    /** worker threads that answer identify calls; 0 answers them on the request thread */
    workers: number;
  };
  auth: AuthConfig;
  limits: LimitsConfig;
  mail: MailConfig;
  /** the demo scenario seeder */
  demo: {
    /** seed the demo scenario even in production */
    seed: boolean;
    /** the exact token the demo partner key gets, when set */
    partnerKey: string | undefined;
  };
  /** folder of the reference matrix and its drawings (`seeds/` at the repo root) */
  seedsDir: string;
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

function readInteger(env: NodeJS.ProcessEnv, name: string, fallback: number, min: number, max: number, problems: string[]): number {
  const text = env[name];
  if (text === undefined || text === '') return fallback;
  const value = Number(text);
  if (!Number.isInteger(value) || value < min || value > max) {
    problems.push(`${name} must be an integer ${min}–${max} (got "${text}")`);
    return fallback;
  }
  return value;
}

function readBoolean(env: NodeJS.ProcessEnv, name: string, fallback: boolean, problems: string[]): boolean {
  const text = env[name];
  if (text === undefined || text === '') return fallback;
  if (text !== 'true' && text !== 'false') problems.push(`${name} must be true or false (got "${text}")`);
  return text === 'true';
}

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

  const isTest = nodeEnv === 'test';
  // Tests hash many passwords, so their cost is low; elsewhere the recommended scrypt minimum (N=2^17, r=8, p=1).
  const scryptN = readInteger(env, 'SCRYPT_N', isTest ? 1024 : 131072, 1024, 1048576, problems);
  if ((scryptN & (scryptN - 1)) !== 0) problems.push(`SCRYPT_N must be a power of two (got ${scryptN})`);

  const redisUrl = env['REDIS_URL'] || undefined;
  if (redisUrl !== undefined && !/^rediss?:\/\//.test(redisUrl)) problems.push(`REDIS_URL must start with redis:// or rediss:// (got "${redisUrl}")`);
  const smtpUrl = env['SMTP_URL'] || undefined;
  if (smtpUrl !== undefined && !/^smtps?:\/\//.test(smtpUrl)) problems.push(`SMTP_URL must start with smtp:// or smtps:// (got "${smtpUrl}")`);
  if (smtpUrl === undefined && nodeEnv === 'production') {
    problems.push('SMTP_URL must be set in production (the local fake mail server is for development and tests only)');
  }

  const publicUrl = (env['PUBLIC_URL'] ?? `http://localhost:${env['PORT'] ?? '3000'}`).replace(/\/+$/, '');
  if (!/^https?:\/\/[^/]+/.test(publicUrl)) problems.push(`PUBLIC_URL must be an http(s) URL (got "${publicUrl}")`);

  const demoPartnerKey = env['DEMO_PARTNER_KEY'] || undefined;
  if (demoPartnerKey !== undefined && !/^svk_[A-Za-z0-9_-]{32,}$/.test(demoPartnerKey)) {
    problems.push('DEMO_PARTNER_KEY must be "svk_" followed by at least 32 letters, digits, "-" or "_"');
  }

  const auth: AuthConfig = {
    sessionTtlHours: readInteger(env, 'SESSION_TTL_HOURS', 72, 1, 24 * 90, problems),
    scrypt: { N: scryptN, r: readInteger(env, 'SCRYPT_R', 8, 1, 32, problems), p: readInteger(env, 'SCRYPT_P', 1, 1, 16, problems) },
    passwordResetTtlMinutes: readInteger(env, 'PASSWORD_RESET_TTL_MINUTES', 30, 5, 24 * 60, problems),
    invitationTtlHours: readInteger(env, 'INVITATION_TTL_HOURS', 72, 1, 24 * 30, problems),
    signInMaxFailures: readInteger(env, 'SIGNIN_MAX_FAILURES', 5, 1, 100, problems),
    signInLockMinutes: readInteger(env, 'SIGNIN_LOCK_MINUTES', 15, 1, 24 * 60, problems),
    signInSlowAfter: readInteger(env, 'SIGNIN_SLOW_AFTER', 2, 0, 100, problems),
    signInDelayMs: readInteger(env, 'SIGNIN_DELAY_MS', isTest ? 20 : 500, 0, 10_000, problems),
  };
  const limits: LimitsConfig = {
    signInPerIpPer15Min: readInteger(env, 'SIGNIN_PER_IP_PER_15MIN', isTest ? 1000 : 30, 1, 1_000_000, problems),
    keyPerMinute: readInteger(env, 'KEY_PER_MINUTE', 120, 1, 1_000_000, problems),
    keyDailyQuota: readInteger(env, 'KEY_DAILY_QUOTA', 5000, 1, 100_000_000, problems),
    // A whole class often shares one school address, so the hourly bundle allowance is per room, not per pupil.
    anonymousBundlePerHour: readInteger(env, 'ANON_BUNDLE_PER_HOUR', isTest ? 1000 : 300, 1, 1_000_000, problems),
    anonymousPerMinute: readInteger(env, 'ANON_PER_MINUTE', isTest ? 100_000 : 300, 1, 1_000_000, problems),
    redisUrl,
  };
  const demo = { seed: readBoolean(env, 'SEED_DEMO', false, problems), partnerKey: demoPartnerKey };

  if (problems.length > 0) throw new ConfigError(problems);
  return Object.freeze({
    env: nodeEnv,
    port,
    logLevel,
    version: readVersion(),
    database: { url: databaseUrl, migrateOnStart: migrateText === 'true' },
    storage: {
      uploadsDir: path.resolve(env['UPLOADS_DIR'] ?? defaultUploads),
      // Test apps write snapshots to the temporary folder, never into the checkout.
      backupDir: path.resolve(env['BACKUP_DIR'] ?? (isTest ? path.join(os.tmpdir(), `sylvasift-backups-${process.pid}`) : 'data/backups')),
    },
    site: { webRoot: path.resolve(env['WEB_ROOT'] ?? path.join(REPO_ROOT, 'dist/web')) },
    contract: { openApiFile: OPENAPI_PATH, validateResponses: validateResponsesText === 'true' },
    identify: { workers: identifyWorkers },
    auth,
    limits,
    mail: { smtpUrl, from: env['MAIL_FROM'] ?? 'Sylvasift <no-reply@sylvasift.invalid>', publicUrl },
    demo,
    seedsDir: path.join(REPO_ROOT, 'seeds'),
  });
}
