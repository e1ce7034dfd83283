import type { Logger } from 'pino';
import type { Sequelize } from 'sequelize';
import { FIELD_LIMITS } from '@shared/engine';
import type { Models } from '../db/models';
import type { PeopleConfig } from './people-config';
import type { Mailer } from '../mail/mailer';
import type { Role } from '../auth/principal';
import { hashPassword, passwordProblem, verifyPassword } from '../auth/passwords';
import { hashToken, newLinkToken, newSessionToken } from '../auth/tokens';
import { HttpProblem, problems } from '../http/problem';
import {
  clearThrottle,
  consumeOneTimeLink,
  findAccount,
  findAccountByEmail,
  findOneTimeLink,
  insertAccount,
  insertOneTimeLink,
  insertSession,
  normaliseEmail,
  readThrottle,
  revokeSession,
  revokeSessionsOf,
  updateAccount,
  writeThrottle,
  type Account,
} from './account-store';

export interface AccountDeps {
  sequelize: Sequelize;
  models: Models;
  config: PeopleConfig;
  mailer: Mailer;
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
    super(429, 'sign-in-locked', 'Too many failed sign-ins', `Too many failed sign-ins for this address. Try again in ${Math.ceil(retryAfterSeconds / 60)} minutes.`);
  }
}

const EMAIL_PATTERN = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;
const wrongCredentials = () => problems.unauthorized('The e-mail address or the password is wrong.');
const linkNotValid = () => new HttpProblem(400, 'link-not-valid', 'Link not valid', 'This link is unknown, has been used already, or has expired.');
const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

function checkEmail(email: string): void {
  if (!EMAIL_PATTERN.test(email.trim()) || email.length > FIELD_LIMITS.email.max) {
    throw problems.invalidInput('The e-mail address is not valid.', [{ name: '/email', reason: 'not an e-mail address' }]);
  }
}

function checkPassword(password: string): void {
  const problem = passwordProblem(password);
  if (problem) throw problems.invalidInput(`The password ${problem}.`, [{ name: '/password', reason: problem }]);
}

export function accountService(deps: AccountDeps) {
  const { models, config, mailer, sequelize, logger } = deps;
  // A hash with the current parameters, so a sign-in for an unknown address costs as much as a real one.
  const decoyHash = hashPassword('no account has this password', config.scrypt);

  async function startSession(account: Account): Promise<SignedIn> {
    const token = newSessionToken();
    const expiresAt = new Date(Date.now() + config.sessionTtlHours * 3600_000);
    await insertSession(models, { userId: account.id, tokenHash: hashToken(token), expiresAt });
    await updateAccount(models, account.id, { lastSignInAt: new Date() });
    return { token, tokenType: 'Bearer', expiresAt, account };
  }

  function link(kind: 'reset-password' | 'invitation', token: string): string {
    return `${config.publicUrl}/account/${kind}/${token}`;
  }

  return {
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

    /**
     * Sends a single-use reset link when an active account has the address. The answer is the same
     * either way and the mail leaves in the background, so neither content nor timing tells who has an account.
     */
    async requestPasswordReset(emailInput: string): Promise<void> {
      checkEmail(emailInput);
      const account = await findAccountByEmail(models, emailInput);
      if (!account || !account.active) return;
      const token = newLinkToken();
      const expiresAt = new Date(Date.now() + config.passwordResetTtlMinutes * 60_000);
      await insertOneTimeLink(models, { purpose: 'password-reset', tokenHash: hashToken(token), email: account.email, userId: account.id, role: null, createdBy: null, expiresAt });
      void mailer.send({
        to: account.email,
        subject: 'Reset your Sylvasift password',
        text: [
          `Hello ${account.displayName},`,
          '',
          `Someone asked to reset the password of your Sylvasift account. To choose a new one, open this link within ${config.passwordResetTtlMinutes} minutes:`,
          '',
          link('reset-password', token),
          '',
          'The link works once. If you did not ask for this, ignore this message; your password stays as it is.',
        ].join('\n'),
      });
    },

    /** Sets a new password from a reset link, uses the link up, and ends every open session of that account. */
    async resetPassword(token: string, password: string): Promise<void> {
      checkPassword(password);
      const found = await findOneTimeLink(models, 'password-reset', hashToken(token));
      if (!found || found.usedAt || found.expiresAt.getTime() <= Date.now() || found.userId === null) throw linkNotValid();
      const userId = found.userId;
      const passwordHash = await hashPassword(password, config.scrypt);
      await sequelize.transaction(async (transaction) => {
        const now = new Date();
        if (!(await consumeOneTimeLink(models, found.id, now, transaction))) throw linkNotValid();
        await updateAccount(models, userId, { passwordHash }, transaction);
        await revokeSessionsOf(models, userId, now, transaction);
      });
      await clearThrottle(models, found.email);
    },

    /** An admin invites someone by e-mail with the role they will have; the link creates the account. */
    async invite(input: { email: string; role: Role; invitedBy: { userId: number; displayName: string } }): Promise<{ email: string; role: Role; expiresAt: Date }> {
      checkEmail(input.email);
      if (await findAccountByEmail(models, input.email)) throw problems.conflict('An account with this e-mail address exists already.');
      const token = newLinkToken();
      const expiresAt = new Date(Date.now() + config.invitationTtlHours * 3600_000);
      const email = normaliseEmail(input.email);
      await insertOneTimeLink(models, { purpose: 'invitation', tokenHash: hashToken(token), email, userId: null, role: input.role, createdBy: input.invitedBy.userId, expiresAt });
      const sent = await mailer.send({
        to: email,
        subject: 'You are invited to Sylvasift',
        text: [
          `${input.invitedBy.displayName} invited you to Sylvasift as a ${input.role}.`,
          '',
          `To create your account, open this link within ${config.invitationTtlHours} hours:`,
          '',
          link('invitation', token),
          '',
          'The link works once.',
        ].join('\n'),
      });
      if (!sent) throw problems.serviceUnavailable('The invitation could not be e-mailed; try again later.');
      return { email, role: input.role, expiresAt };
    },

    /** Accepting an invitation creates the account with the invited role and signs it in. */
    async acceptInvitation(token: string, input: { displayName: string; password: string }): Promise<SignedIn> {
      checkPassword(input.password);
      const found = await findOneTimeLink(models, 'invitation', hashToken(token));
      if (!found || found.usedAt || found.expiresAt.getTime() <= Date.now() || found.role === null) throw linkNotValid();
      const role = found.role;
      const passwordHash = await hashPassword(input.password, config.scrypt);
      const account = await sequelize.transaction(async (transaction) => {
        if (!(await consumeOneTimeLink(models, found.id, new Date(), transaction))) throw linkNotValid();
        if (await models.User.count({ where: { email: found.email }, transaction })) {
          throw problems.conflict('An account with this e-mail address exists already.');
        }
        return insertAccount(models, { email: found.email, displayName: input.displayName.trim(), passwordHash, role }, transaction);
      });
      return startSession(account);
    },
  };
}

export type AccountService = ReturnType<typeof accountService>;
