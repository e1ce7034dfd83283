import type { RequestHandler } from 'express';
import { rateLimit, MemoryStore, type Options, type RateLimitRequestHandler, type Store } from 'express-rate-limit';
import { RedisStore, type RedisReply } from 'rate-limit-redis';
import { Redis } from 'ioredis';
import type { Logger } from 'pino';
import { problems } from '../http/problem';
import type { Principal } from '../auth/principal';
import type { QuotaLeft } from '../keys/quota';

/** Request limits per caller (config section `limits`). */
export interface LimitsConfig {
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
}

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;
const DAY = 24 * HOUR;

/** Where limiter counters live: this process's memory, or Redis so several API processes share one quota. */
export interface LimiterStores {
  /** a fresh store for one limiter (each limiter needs its own) */
  storeFor(name: string): Store;
  /** where the counters live, for the log and the health of the setup */
  kind: 'memory' | 'redis';
  close(): Promise<void>;
}

export function createLimiterStores(config: LimitsConfig, logger: Logger): LimiterStores {
  if (!config.redisUrl) {
    return { kind: 'memory', storeFor: () => new MemoryStore(), close: () => Promise.resolve() };
  }
  const client = new Redis(config.redisUrl, { maxRetriesPerRequest: 2, enableOfflineQueue: true });
  client.on('error', (error) => logger.error({ err: error }, 'redis error (rate limits)'));
  return {
    kind: 'redis',
    storeFor: (name) =>
      new RedisStore({
        prefix: `sylvasift:rl:${name}:`,
        sendCommand: (command: string, ...args: string[]) => client.call(command, ...args) as Promise<RedisReply>,
      }),
    close: async () => {
      await client.quit();
    },
  };
}

/** The limiters the app mounts; each answers 429 as a problem with draft-8 RateLimit and RateLimit-Policy headers. */
export interface RateLimiters {
  /** failed sign-ins per IP address per 15 minutes (successful ones are not counted) */
  signIn: RequestHandler;
  /** per partner key: a per-minute rate and a daily quota; passes everyone else through */
  partnerKey: RequestHandler[];
  /** what the daily limiter has left for one key (read from its own store, so it is the number it enforces) */
  partnerKeyQuota(keyId: number): Promise<QuotaLeft>;
  /** anonymous downloads of the current bundle per IP address per hour */
  anonymousBundle: RequestHandler;
  /** all anonymous API calls per IP address per minute */
  anonymous: RequestHandler;
}

function limiter(
  stores: LimiterStores,
  name: string,
  options: Partial<Options> & Pick<Options, 'windowMs' | 'limit'>,
  detail: string,
): RateLimitRequestHandler {
  return rateLimit({
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    identifier: name,
    store: stores.storeFor(name),
    handler: (_req, _res, next) => next(problems.tooManyRequests(detail)),
    ...options,
  });
}

export function createRateLimiters(config: LimitsConfig, stores: LimiterStores): RateLimiters {
  const keyId = (principal: Principal | undefined) => (principal?.kind === 'key' ? `key-${principal.keyId}` : '');
  const keyDay = limiter(
    stores,
    'key-day',
    { windowMs: DAY, limit: config.keyDailyQuota, skip: (req) => req.principal?.kind !== 'key', keyGenerator: (req) => keyId(req.principal) },
    `This partner key has used its quota of ${config.keyDailyQuota} requests a day.`,
  );
  return {
    signIn: limiter(
      stores,
      'sign-in',
      { windowMs: 15 * MINUTE, limit: config.signInPerIpPer15Min, skipSuccessfulRequests: true },
      'Too many failed sign-ins from this address. Wait a while before trying again.',
    ),
    partnerKey: [
      limiter(
        stores,
        'key-minute',
        { windowMs: MINUTE, limit: config.keyPerMinute, skip: (req) => req.principal?.kind !== 'key', keyGenerator: (req) => keyId(req.principal) },
        `This partner key made more than ${config.keyPerMinute} requests in a minute.`,
      ),
      keyDay,
    ],
    async partnerKeyQuota(id) {
      const window = await keyDay.getKey(`key-${id}`);
      const open = window?.resetTime !== undefined && window.resetTime.getTime() > Date.now();
      return {
        limit: config.keyDailyQuota,
        remaining: open ? Math.max(config.keyDailyQuota - window.totalHits, 0) : config.keyDailyQuota,
        resetsAt: open ? (window.resetTime ?? null) : null,
      };
    },
    anonymousBundle: limiter(
      stores,
      'bundle-anonymous',
      { windowMs: HOUR, limit: config.anonymousBundlePerHour, skip: (req) => req.principal !== undefined },
      `Anonymous callers may download the bundle ${config.anonymousBundlePerHour} times an hour; sign in or use a partner key for more.`,
    ),
    anonymous: limiter(
      stores,
      'anonymous',
      { windowMs: MINUTE, limit: config.anonymousPerMinute, skip: (req) => req.principal !== undefined },
      `Anonymous callers may make ${config.anonymousPerMinute} requests a minute; sign in or use a partner key for more.`,
    ),
  };
}
