import type { Sequelize } from 'sequelize';
import type { AccountModels } from './account-models';
import type { AuthConfig } from './auth-config';
import type { Mailer } from '../mail/mailer';
import type { Role } from '../auth/principal';
import { hashPassword } from '../auth/passwords';
import { hashToken, newLinkToken } from '../auth/tokens';
import { HttpProblem, problems } from '../http/problem';
import {
  clearThrottle,
  consumeOneTimeLink,
  findAccountByEmail,
  findOneTimeLink,
  insertAccount,
  insertOneTimeLink,
  normaliseEmail,
  revokeSessionsOf,
  updateAccount,
} from './account-store';
import { checkEmail, checkPassword, type SessionService, type SignedIn } from './session-service';

export interface OneTimeLinkDeps {
  sequelize: Sequelize;
  models: AccountModels;
  config: AuthConfig;
  /** base of the links in the e-mails */
  publicUrl: string;
  mailer: Mailer;
  /** an accepted invitation signs the new account in */
  sessions: SessionService;
}

const linkNotValid = () => new HttpProblem(400, 'link-not-valid', 'Link not valid', 'This link is unknown, has been used already, or has expired.');

/** Single-use e-mailed links: password resets and invitations. */
export function oneTimeLinkService(deps: OneTimeLinkDeps) {
  const { models, config, publicUrl, mailer, sequelize, sessions } = deps;

  function link(kind: 'reset-password' | 'invitation', token: string): string {
    return `${publicUrl}/account/${kind}/${token}`;
  }

  return {
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
      await insertOneTimeLink(models, {
        purpose: 'password-reset',
        tokenHash: hashToken(token),
        email: account.email,
        userId: account.id,
        role: null,
        createdBy: null,
        expiresAt,
      });
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
    async invite(input: {
      email: string;
      role: Role;
      invitedBy: { userId: number; displayName: string };
    }): Promise<{ email: string; role: Role; expiresAt: Date }> {
      checkEmail(input.email);
      if (await findAccountByEmail(models, input.email)) throw problems.conflict('An account with this e-mail address exists already.');
      const token = newLinkToken();
      const expiresAt = new Date(Date.now() + config.invitationTtlHours * 3600_000);
      const email = normaliseEmail(input.email);
      await insertOneTimeLink(models, {
        purpose: 'invitation',
        tokenHash: hashToken(token),
        email,
        userId: null,
        role: input.role,
        createdBy: input.invitedBy.userId,
        expiresAt,
      });
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
      return sessions.startSession(account);
    },
  };
}

export type OneTimeLinkService = ReturnType<typeof oneTimeLinkService>;
