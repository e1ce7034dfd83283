import { Op, QueryTypes } from 'sequelize';
import type { KeyModels } from './key-models';
import { isScope, type Scope } from '../auth/principal';

export interface PartnerKey {
  id: number;
  ownerId: number;
  name: string;
  prefix: string;
  scopes: Scope[];
  /** browser origins that may call with this key (CORS) */
  allowedOrigins: string[];
  createdAt: Date;
  lastUsedAt: Date | null;
  revokedAt: Date | null;
}

export interface DailyUsage {
  day: string;
  count: number;
}

interface KeyRow {
  id: number;
  ownerId: number;
  name: string;
  prefix: string;
  scopes: string[];
  allowedOrigins: string[] | null;
  createdAt: Date;
  lastUsedAt: Date | null;
  revokedAt: Date | null;
}

const toKey = (row: KeyRow): PartnerKey => ({
  id: row.id,
  ownerId: row.ownerId,
  name: row.name,
  prefix: row.prefix,
  scopes: row.scopes.filter(isScope),
  allowedOrigins: row.allowedOrigins ?? [],
  createdAt: row.createdAt,
  lastUsedAt: row.lastUsedAt,
  revokedAt: row.revokedAt,
});

export async function insertKey(
  models: KeyModels,
  key: { ownerId: number; name: string; prefix: string; keyHash: string; scopes: Scope[]; allowedOrigins: string[] },
): Promise<PartnerKey> {
  const row = await models.PartnerKey.create({ ...key, revokedAt: null, revokedBy: null, lastUsedAt: null });
  return toKey(row);
}

export async function findKey(models: KeyModels, id: number): Promise<PartnerKey | undefined> {
  const row = await models.PartnerKey.findByPk(id);
  return row ? toKey(row) : undefined;
}

export async function listKeys(models: KeyModels, filter: { ownerId?: number }): Promise<PartnerKey[]> {
  const rows = await models.PartnerKey.findAll({ where: filter.ownerId === undefined ? {} : { ownerId: filter.ownerId }, order: [['id', 'ASC']] });
  return rows.map(toKey);
}

/** Changes a key's name or allowed origins; the key as it is now. */
export async function updateKey(models: KeyModels, id: number, change: { name?: string; allowedOrigins?: string[] }): Promise<PartnerKey | undefined> {
  const row = await models.PartnerKey.findByPk(id);
  if (!row) return undefined;
  if (change.name !== undefined) row.name = change.name;
  if (change.allowedOrigins !== undefined) row.allowedOrigins = change.allowedOrigins;
  await row.save();
  return toKey(row);
}

/** The allowed origins of every live key, by key id (for CORS). */
export async function liveKeyOrigins(models: KeyModels): Promise<Map<number, string[]>> {
  const rows = await models.PartnerKey.findAll({ attributes: ['id', 'allowedOrigins'], where: { revokedAt: null } });
  return new Map(rows.map((row) => [row.id, row.allowedOrigins ?? []]));
}

export async function markRevoked(models: KeyModels, id: number, revokedBy: number, now: Date): Promise<void> {
  await models.PartnerKey.update({ revokedAt: now, revokedBy }, { where: { id, revokedAt: null } });
}

/** Revokes every live key of one owner (the owner was deactivated). */
export async function revokeKeysOf(models: KeyModels, ownerId: number, revokedBy: number, now: Date): Promise<void> {
  await models.PartnerKey.update({ revokedAt: now, revokedBy }, { where: { ownerId, revokedAt: null } });
}

/** Requests counted against one key's UTC day, and when the last of them came in. */
export interface UsageCount {
  keyId: number;
  day: string;
  count: number;
  lastUsedAt: Date;
}

/** Adds counted requests to key_usage in one statement (concurrent writers add, never overwrite). */
export async function addUsage(models: KeyModels, counts: readonly UsageCount[], now: Date): Promise<void> {
  if (counts.length === 0) return;
  const sequelize = models.KeyUsage.sequelize;
  if (!sequelize) throw new Error('KeyUsage model is not bound to a database');
  const rows = counts.map(() => '(?, ?, ?, ?, ?)').join(', ');
  await sequelize.query(
    `INSERT INTO key_usage (key_id, day, count, created_at, updated_at) VALUES ${rows}
     ON CONFLICT (key_id, day) DO UPDATE SET count = key_usage.count + excluded.count, updated_at = excluded.updated_at`,
    { replacements: counts.flatMap((c) => [c.keyId, c.day, c.count, now.toISOString(), now.toISOString()]) },
  );
}

/** Moves each counted key's last-used time forward (never back, whatever order processes write in). */
export async function touchLastUsed(models: KeyModels, counts: readonly UsageCount[]): Promise<void> {
  const lastUse = new Map<number, Date>();
  for (const c of counts) if ((lastUse.get(c.keyId)?.getTime() ?? -Infinity) < c.lastUsedAt.getTime()) lastUse.set(c.keyId, c.lastUsedAt);
  for (const [id, lastUsedAt] of lastUse) {
    await models.PartnerKey.update({ lastUsedAt }, { where: { id, lastUsedAt: { [Op.or]: [{ [Op.is]: null }, { [Op.lt]: lastUsedAt }] } } });
  }
}

/** Which of the keys counted still exist (read directly, so it never waits for pending usage). */
export async function liveKeyIds(models: KeyModels, counts: readonly UsageCount[]): Promise<Set<number>> {
  const sequelize = models.PartnerKey.sequelize;
  if (!sequelize) throw new Error('PartnerKey model is not bound to a database');
  const ids = [...new Set(counts.map((c) => c.keyId))];
  const rows = await sequelize.query<{ id: number }>('SELECT id FROM partner_keys WHERE id IN (:ids)', { replacements: { ids }, type: QueryTypes.SELECT });
  return new Set(rows.map((row) => row.id));
}

/** Usage per key for the days from `sinceDay` on (YYYY-MM-DD, UTC), oldest first. */
export async function usageSince(models: KeyModels, keyIds: number[], sinceDay: string): Promise<Map<number, DailyUsage[]>> {
  const rows = await models.KeyUsage.findAll({ where: { keyId: { [Op.in]: keyIds }, day: { [Op.gte]: sinceDay } }, order: [['day', 'ASC']] });
  const byKey = new Map<number, DailyUsage[]>();
  for (const row of rows) {
    const list = byKey.get(row.keyId) ?? [];
    list.push({ day: row.day, count: row.count });
    byKey.set(row.keyId, list);
  }
  return byKey;
}
