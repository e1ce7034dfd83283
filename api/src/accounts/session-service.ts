import type { Logger } from 'pino';
import { FIELD_LIMITS } from '@shared/engine';
import type { AccountModels } from './account-models';
import type { AuthConfig } from './auth-config';
import { hashPassword, passwordProblem, verifyPassword } from '../auth/passwords';
import { hashToken, newSessionToken } from '../auth/tokens';
import { HttpProblem, problems } from '../http/problem';
import {
  clearThrottle,
  findAccount,
  findAccountByEmail,
  insertAccount,
  insertSession,
  normaliseEmail,
  readThrottle,
  revokeSession,
  updateAccount,
  writeThrottle,
  type Account,
} from './account-store';

export interface SessionDeps {
  models: AccountModels;
  config: AuthConfig;
  logger: Logger;
}

export interface SignedIn {
  token: string;
  tokenType: 'Bearer';
  expiresAt: Date;
  account: Account;
}

/** Thrown while an address is locked after too many failed sign-ins; the route adds Retry-After. */
export class SignInLocked extends HttpProblem {
  constructor(readonly retryAfterSeconds: number) {
    super(
      429,
      'sign-in-locked',
      'Too many failed sign-ins',
      `Too many failed sign-ins for this address. Try again in ${Math.ceil(retryAfterSeconds / 60)} minutes.`,
    );
  }
}

const EMAIL_PATTERN = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;
const wrongCredentials = () => problems.unauthorized('The e-mail address or the password is wrong.');
const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

export function checkEmail(email: string): void {
  if (!EMAIL_PATTERN.test(email.trim()) || email.length > FIELD_LIMITS.email.max) {
    throw problems.invalidInput('The e-mail address is not valid.', [{ name: '/email', reason: 'not an e-mail address' }]);
  }
}

export function checkPassword(password: string): void {
  const problem = passwordProblem(password);
  if (problem) throw problems.invalidInput(`The password ${problem}.`, [{ name: '/password', reason: problem }]);
}

/** Sign-up, sign-in (with throttling per address), sign-out and the current account. */
export function sessionService(deps: SessionDeps) {
  const { models, config, logger } = deps;
  // A hash with the current parameters, so a sign-in for an unknown address costs as much as a real one.
  const decoyHash = hashPassword('no account has this password', config.scrypt);

  /** Opens a session for an account that has just proved who it is. */
  async function startSession(account: Account): Promise<SignedIn> {
    const token = newSessionToken();
    const expiresAt = new Date(Date.now() + config.sessionTtlHours * 3600_000);
    await insertSession(models, { userId: account.id, tokenHash: hashToken(token), expiresAt });
    await updateAccount(models, account.id, { lastSignInAt: new Date() });
    return { token, tokenType: 'Bearer', expiresAt, account };
  }

  return {
    startSession,

    /** Anyone may sign up; every new account starts as a learner. */
    async signUp(input: { email: string; password: string; displayName: string }): Promise<Account> {
      checkEmail(input.email);
      checkPassword(input.password);
      if (await findAccountByEmail(models, input.email)) throw problems.conflict('An account with this e-mail address exists already.');
      const passwordHash = await hashPassword(input.password, config.scrypt);
      return insertAccount(models, { email: input.email, displayName: input.displayName.trim(), passwordHash, role: 'learner' });
    },

    /**
     * Checks the password and opens a session. Failures are counted per address (known or not):
     * after `signInSlowAfter` failures each answer is delayed, doubling up to 8 times the base delay;
     * after `signInMaxFailures` the address is locked for `signInLockMinutes`, even for the right password.
     */
    async signIn(input: { email: string; password: string }): Promise<SignedIn> {
      const email = normaliseEmail(input.email);
      const now = Date.now();
      const throttle = await readThrottle(models, email);
      if (throttle.lockedUntil && throttle.lockedUntil.getTime() > now) {
        throw new SignInLocked(Math.ceil((throttle.lockedUntil.getTime() - now) / 1000));
      }
      const failuresSoFar = throttle.lockedUntil ? 0 : throttle.failures;
      if (failuresSoFar >= config.signInSlowAfter) {
        await sleep(config.signInDelayMs * Math.min(8, 2 ** (failuresSoFar - config.signInSlowAfter)));
      }

      const account = await findAccountByEmail(models, email);
      const matches = await verifyPassword(input.password, account?.passwordHash ?? (await decoyHash));
      if (account && account.active && matches) {
        if (throttle.failures > 0 || throttle.lockedUntil) await clearThrottle(models, email);
        return startSession(account);
      }

      const failures = failuresSoFar + 1;
      if (failures >= config.signInMaxFailures) {
        await writeThrottle(models, email, { failures: 0, lockedUntil: new Date(now + config.signInLockMinutes * 60_000) });
        logger.warn({ email }, 'sign-in locked after repeated failures');
      } else {
        await writeThrottle(models, email, { failures, lockedUntil: null });
      }
      throw wrongCredentials();
    },

    async signOut(token: string): Promise<void> {
      await revokeSession(models, hashToken(token), new Date());
    },

    async me(userId: number): Promise<Account> {
      const account = await findAccount(models, userId);
      if (!account) throw problems.notFound('This account no longer exists.');
      return account;
    },
  };
}

export type SessionService = ReturnType<typeof sessionService>;
