import { Op } from 'sequelize';
import type { Models } from '../db/models';
import { isScope, type Principal } from './principal';

/** The signed-in user behind a live session token hash, or undefined (unknown, expired, revoked or deactivated). */
export async function findSessionPrincipal(models: Models, tokenHash: string, now: Date): Promise<Principal | undefined> {
  const session = await models.Session.findOne({
    where: { tokenHash, revokedAt: null, expiresAt: { [Op.gt]: now } },
  });
  if (!session) return undefined;
  const user = await models.User.findByPk(session.userId);
  if (!user || !user.active) return undefined;
  return { kind: 'user', userId: user.id, email: user.email, displayName: user.displayName, role: user.role };
}

/** The partner key behind a key hash, or undefined (unknown, revoked, or its owner deactivated). */
export async function findKeyPrincipal(models: Models, keyHash: string): Promise<Principal | undefined> {
  const key = await models.PartnerKey.findOne({ where: { keyHash, revokedAt: null } });
  if (!key) return undefined;
  const owner = await models.User.findByPk(key.ownerId);
  if (!owner || !owner.active) return undefined;
  return { kind: 'key', keyId: key.id, ownerId: key.ownerId, scopes: key.scopes.filter(isScope) };
}
