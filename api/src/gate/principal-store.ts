import { Op } from 'sequelize';
import type { AccountModels } from '../accounts/account-models';
import type { KeyModels } from '../keys/key-models';
import { isScope } from '../auth/principal';
import type { Found } from './principal-cache';

/** Latest representable date: a partner key has no expiry of its own. */
const NEVER = new Date(8.64e15);

/** The signed-in user behind a live session token hash, or undefined (unknown, expired, revoked or deactivated). */
export async function findSessionPrincipal(models: AccountModels & KeyModels, tokenHash: string, now: Date): Promise<Found | undefined> {
  const session = await models.Session.findOne({
    where: { tokenHash, revokedAt: null, expiresAt: { [Op.gt]: now } },
  });
  if (!session) return undefined;
  const user = await models.User.findByPk(session.userId);
  if (!user || !user.active) return undefined;
  return { principal: { kind: 'user', userId: user.id, email: user.email, displayName: user.displayName, role: user.role }, validUntil: session.expiresAt };
}

/** The partner key behind a key hash, or undefined (unknown, revoked, or its owner deactivated). */
export async function findKeyPrincipal(models: AccountModels & KeyModels, keyHash: string): Promise<Found | undefined> {
  const key = await models.PartnerKey.findOne({ where: { keyHash, revokedAt: null } });
  if (!key) return undefined;
  const owner = await models.User.findByPk(key.ownerId);
  if (!owner || !owner.active) return undefined;
  return { principal: { kind: 'key', keyId: key.id, ownerId: key.ownerId, scopes: key.scopes.filter(isScope) }, validUntil: NEVER };
}
