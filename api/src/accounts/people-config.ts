import os from 'node:os';
import path from 'node:path';

type Environment = 'development' | 'test' | 'production';

/** scrypt parameters for new password hashes; old hashes keep the parameters stored beside them */
export interface ScryptParams {
  /** CPU/memory cost N, a power of two */
  N: number;
  /** block size r */
  r: number;
  /** parallelisation p */
  p: number;
}

/** Accounts, sessions, sign-in throttling, partner keys, rate limits, mail, backups and the demo scenario. */
export interface PeopleConfig {
  /** how long a session token stays valid after sign-in */
  sessionTtlHours: number;
  scrypt: ScryptParams;
  /** how long a password-reset link works */
  passwordResetTtlMinutes: number;
  /** how long an invitation link works */
  invitationTtlHours: number;
  /** consecutive failed sign-ins for one e-mail address before it is locked */
  signInMaxFailures: number;
  /** how long that address stays locked */
  signInLockMinutes: number;
  /** failed sign-ins for one address before answers are slowed down */
  signInSlowAfter: number;
  /** first delay once slowing starts; it doubles with each further failure, capped at 8 times this */
  signInDelayMs: number;
  /** failed sign-ins one IP address may make per 15 minutes */
  signInPerIpPer15Min: number;
  /** requests one partner key may make per minute */
  keyPerMinute: number;
  /** requests one partner key may make per UTC day (its quota) */
  keyDailyQuota: number;
  /** anonymous downloads of the current bundle per IP address per hour */
  anonymousBundlePerHour: number;
  /** anonymous API requests per IP address per minute */
  anonymousPerMinute: number;
  /** when set, rate-limit counters live in Redis so several API processes share them */
  redisUrl: string | undefined;
  /** real SMTP server (smtp:// or smtps://); unset in development and test means the local fake server */
  smtpUrl: string | undefined;
  /** From: address of every message */
  mailFrom: string;
  /** base URL for links in e-mail, without a trailing slash */
  publicUrl: string;
  /** folder for SQLite snapshots */
  backupDir: string;
  /** seed the demo scenario even in production */
  seedDemo: boolean;
  /** the exact token the demo partner key gets, when set */
  demoPartnerKey: string | undefined;
}

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

/** Reads the people settings from the environment; pushes every problem found onto `problems`. */
export function readPeopleConfig(env: NodeJS.ProcessEnv, nodeEnv: Environment, problems: string[]): PeopleConfig {
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

  return {
    sessionTtlHours: readInteger(env, 'SESSION_TTL_HOURS', 72, 1, 24 * 90, problems),
    scrypt: { N: scryptN, r: readInteger(env, 'SCRYPT_R', 8, 1, 32, problems), p: readInteger(env, 'SCRYPT_P', 1, 1, 16, problems) },
    passwordResetTtlMinutes: readInteger(env, 'PASSWORD_RESET_TTL_MINUTES', 30, 5, 24 * 60, problems),
    invitationTtlHours: readInteger(env, 'INVITATION_TTL_HOURS', 72, 1, 24 * 30, problems),
    signInMaxFailures: readInteger(env, 'SIGNIN_MAX_FAILURES', 5, 1, 100, problems),
    signInLockMinutes: readInteger(env, 'SIGNIN_LOCK_MINUTES', 15, 1, 24 * 60, problems),
    signInSlowAfter: readInteger(env, 'SIGNIN_SLOW_AFTER', 2, 0, 100, problems),
    signInDelayMs: readInteger(env, 'SIGNIN_DELAY_MS', isTest ? 20 : 500, 0, 10_000, problems),
    signInPerIpPer15Min: readInteger(env, 'SIGNIN_PER_IP_PER_15MIN', isTest ? 1000 : 30, 1, 1_000_000, problems),
    keyPerMinute: readInteger(env, 'KEY_PER_MINUTE', 120, 1, 1_000_000, problems),
    keyDailyQuota: readInteger(env, 'KEY_DAILY_QUOTA', 5000, 1, 100_000_000, problems),
    // A whole class often shares one school address, so the hourly bundle allowance is per room, not per pupil.
    anonymousBundlePerHour: readInteger(env, 'ANON_BUNDLE_PER_HOUR', isTest ? 1000 : 300, 1, 1_000_000, problems),
    anonymousPerMinute: readInteger(env, 'ANON_PER_MINUTE', isTest ? 100_000 : 300, 1, 1_000_000, problems),
    redisUrl,
    smtpUrl,
    mailFrom: env['MAIL_FROM'] ?? 'Sylvasift <no-reply@sylvasift.invalid>',
    publicUrl,
    // Test apps write snapshots to the temporary folder, never into the checkout.
    backupDir: path.resolve(env['BACKUP_DIR'] ?? (isTest ? path.join(os.tmpdir(), `sylvasift-backups-${process.pid}`) : 'data/backups')),
    seedDemo: readBoolean(env, 'SEED_DEMO', false, problems),
    demoPartnerKey,
  };
}
