import { randomBytes, scrypt, timingSafeEqual, type ScryptOptions } from 'node:crypto';
import { FIELD_LIMITS } from '@shared/engine';

/** scrypt parameters for new password hashes; old hashes keep the parameters stored beside them */
export interface ScryptParams {
  /** CPU/memory cost N, a power of two */
  N: number;
  /** block size r */
  r: number;
  /** parallelisation p */
  p: number;
}

const KEY_LENGTH = 32;
const SALT_BYTES = 16;

function derive(password: string, salt: Buffer, params: ScryptParams): Promise<Buffer> {
  // scrypt needs 128 * N * r bytes; allow twice that so the default 32 MiB cap does not refuse strong settings.
  const options: ScryptOptions = { N: params.N, r: params.r, p: params.p, maxmem: 256 * params.N * params.r + 1024 * 1024 };
  return new Promise((resolve, reject) => {
    scrypt(password.normalize('NFKC'), salt, KEY_LENGTH, options, (error, key) => (error ? reject(error) : resolve(key)));
  });
}

/** Hashes a password as `scrypt$N$r$p$salt$hash`, so the parameters travel with the hash and can be raised later. */
export async function hashPassword(password: string, params: ScryptParams): Promise<string> {
  const salt = randomBytes(SALT_BYTES);
  const key = await derive(password, salt, params);
  return ['scrypt', params.N, params.r, params.p, salt.toString('base64url'), key.toString('base64url')].join('$');
}

/** True when the password matches the stored hash; compares in constant time. */
export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const parts = stored.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return false;
  const [N, r, p] = parts.slice(1, 4).map(Number);
  if (!N || !r || !p) return false;
  const salt = Buffer.from(parts[4] ?? '', 'base64url');
  const expected = Buffer.from(parts[5] ?? '', 'base64url');
  const actual = await derive(password, salt, { N, r, p });
  return actual.length === expected.length && timingSafeEqual(actual, expected);
}

/** Password rules: long enough to resist guessing, not absurdly long (scrypt reads all of it). */
export function passwordProblem(password: string): string | undefined {
  if (password.length < FIELD_LIMITS.password.min) return `must be at least ${FIELD_LIMITS.password.min} characters`;
  if (password.length > FIELD_LIMITS.password.max) return `must be at most ${FIELD_LIMITS.password.max} characters`;
  return undefined;
}
