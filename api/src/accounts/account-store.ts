import { Op, type Transaction } from 'sequelize';
import type { AccountModels } from './account-models';
import type { Role } from '../auth/principal';
import type { OneTimePurpose } from './account-models';

export interface Account {
  id: number;
  email: string;
  displayName: string;
  role: Role;
  active: boolean;
  createdAt: Date;
  lastSignInAt: Date | null;
}

export interface AccountWithHash extends Account {
  passwordHash: string;
}

export interface OneTimeLink {
  id: number;
  purpose: OneTimePurpose;
  email: string;
  userId: number | null;
  role: Role | null;
  expiresAt: Date;
  usedAt: Date | null;
}

interface UserRow {
  id: number;
  email: string;
  displayName: string;
  role: Role;
  active: boolean;
  createdAt: Date;
  lastSignInAt: Date | null;
  passwordHash: string;
}

const toAccount = (row: UserRow): Account => ({
  id: row.id,
  email: row.email,
  displayName: row.displayName,
  role: row.role,
  active: row.active,
  createdAt: row.createdAt,
  lastSignInAt: row.lastSignInAt,
});

/** E-mail addresses are compared case-insensitively; they are stored trimmed and lower-cased. */
export const normaliseEmail = (email: string) => email.trim().toLowerCase();

export async function findAccountByEmail(models: AccountModels, email: string): Promise<AccountWithHash | undefined> {
  const row = await models.User.findOne({ where: { email: normaliseEmail(email) } });
  return row ? { ...toAccount(row), passwordHash: row.passwordHash } : undefined;
}

export async function findAccount(models: AccountModels, id: number): Promise<Account | undefined> {
  const row = await models.User.findByPk(id);
  return row ? toAccount(row) : undefined;
}

export async function insertAccount(
  models: AccountModels,
  account: { email: string; displayName: string; passwordHash: string; role: Role },
  transaction?: Transaction,
): Promise<Account> {
  const row = await models.User.create({ ...account, email: normaliseEmail(account.email), lastSignInAt: null }, { transaction });
  return toAccount(row);
}

export async function listAccounts(models: AccountModels, filter: { role?: Role; active?: boolean }): Promise<Account[]> {
  const where: Record<string, unknown> = {};
  if (filter.role) where['role'] = filter.role;
  if (filter.active !== undefined) where['active'] = filter.active;
  const rows = await models.User.findAll({ where, order: [['id', 'ASC']] });
  return rows.map(toAccount);
}

export async function listActiveEmailsWithRoles(models: AccountModels, roles: Role[]): Promise<string[]> {
  const rows = await models.User.findAll({ where: { role: { [Op.in]: roles }, active: true }, attributes: ['email'] });
  return rows.map((row) => row.email);
}

export async function updateAccount(
  models: AccountModels,
  id: number,
  changes: Partial<{ role: Role; active: boolean; passwordHash: string; displayName: string; lastSignInAt: Date }>,
  transaction?: Transaction,
): Promise<void> {
  await models.User.update(changes, { where: { id }, transaction });
}

export async function insertSession(models: AccountModels, session: { userId: number; tokenHash: string; expiresAt: Date }): Promise<void> {
  await models.Session.create({ ...session, revokedAt: null });
}

export async function revokeSession(models: AccountModels, tokenHash: string, now: Date): Promise<void> {
  await models.Session.update({ revokedAt: now }, { where: { tokenHash, revokedAt: null } });
}

/** Ends every live session of one user (password changed, account deactivated). */
export async function revokeSessionsOf(models: AccountModels, userId: number, now: Date, transaction?: Transaction): Promise<void> {
  await models.Session.update({ revokedAt: now }, { where: { userId, revokedAt: null }, transaction });
}

export interface Throttle {
  failures: number;
  lockedUntil: Date | null;
}

export async function readThrottle(models: AccountModels, email: string): Promise<Throttle> {
  const row = await models.SignInThrottle.findByPk(normaliseEmail(email));
  return row ? { failures: row.failures, lockedUntil: row.lockedUntil } : { failures: 0, lockedUntil: null };
}

export async function writeThrottle(models: AccountModels, email: string, throttle: Throttle): Promise<void> {
  await models.SignInThrottle.upsert({ email: normaliseEmail(email), failures: throttle.failures, lockedUntil: throttle.lockedUntil });
}

export async function clearThrottle(models: AccountModels, email: string): Promise<void> {
  await models.SignInThrottle.destroy({ where: { email: normaliseEmail(email) } });
}

export async function insertOneTimeLink(
  models: AccountModels,
  link: { purpose: OneTimePurpose; tokenHash: string; email: string; userId: number | null; role: Role | null; createdBy: number | null; expiresAt: Date },
): Promise<void> {
  await models.OneTimeToken.create({ ...link, email: normaliseEmail(link.email), usedAt: null });
}

export async function findOneTimeLink(models: AccountModels, purpose: OneTimePurpose, tokenHash: string): Promise<OneTimeLink | undefined> {
  const row = await models.OneTimeToken.findOne({ where: { purpose, tokenHash } });
  if (!row) return undefined;
  return { id: row.id, purpose: row.purpose, email: row.email, userId: row.userId, role: row.role, expiresAt: row.expiresAt, usedAt: row.usedAt };
}

/** Marks a link used; false when another request used it first (so a link works exactly once). */
export async function consumeOneTimeLink(models: AccountModels, id: number, now: Date, transaction: Transaction): Promise<boolean> {
  const [changed] = await models.OneTimeToken.update({ usedAt: now }, { where: { id, usedAt: null, expiresAt: { [Op.gt]: now } }, transaction });
  return changed === 1;
}
