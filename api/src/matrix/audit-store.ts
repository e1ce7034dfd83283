import { Op, type Transaction, type WhereOptions } from 'sequelize';
import type { MatrixModels } from './matrix-models';

export type AuditEntity = 'taxon' | 'trait' | 'trait-value' | 'cell' | 'import' | 'edition' | 'photo';

/** Who made a change, as the audit log records it. */
export interface Actor {
  userId: number | null;
  email: string | null;
}

export interface AuditEntryInput {
  entity: AuditEntity;
  entityKey: string;
  action: string;
  before: unknown;
  after: unknown;
  reason: string;
}

export interface AuditEntry extends AuditEntryInput {
  id: number;
  actor: Actor;
  at: Date;
}

export interface AuditFilter {
  entity?: AuditEntity;
  entityKey?: string;
  userId?: number;
  since?: Date;
  limit: number;
  /** entries with an id below this one (the previous page's last id) */
  before?: number;
}

export async function recordAudit(models: MatrixModels, actor: Actor, entries: AuditEntryInput[], transaction?: Transaction): Promise<void> {
  if (entries.length === 0) return;
  await models.AuditEntry.bulkCreate(
    entries.map((entry) => ({
      actorId: actor.userId,
      actorEmail: actor.email,
      entity: entry.entity,
      entityKey: entry.entityKey,
      action: entry.action,
      before: entry.before ?? null,
      after: entry.after ?? null,
      reason: entry.reason,
    })),
    { transaction },
  );
}

/** Audit entries matching the filter, newest first. */
export async function listAudit(models: MatrixModels, filter: AuditFilter): Promise<AuditEntry[]> {
  const where: WhereOptions = {};
  if (filter.entity) Object.assign(where, { entity: filter.entity });
  if (filter.entityKey) Object.assign(where, { entityKey: filter.entityKey });
  if (filter.userId !== undefined) Object.assign(where, { actorId: filter.userId });
  if (filter.since) Object.assign(where, { createdAt: { [Op.gte]: filter.since } });
  if (filter.before !== undefined) Object.assign(where, { id: { [Op.lt]: filter.before } });
  const rows = await models.AuditEntry.findAll({ where, order: [['id', 'DESC']], limit: filter.limit });
  return rows.map((row) => ({
    id: row.id,
    actor: { userId: row.actorId, email: row.actorEmail },
    at: row.createdAt,
    entity: row.entity as AuditEntity,
    entityKey: row.entityKey,
    action: row.action,
    before: row.before,
    after: row.after,
    reason: row.reason,
  }));
}

export async function countAudit(models: MatrixModels): Promise<number> {
  return models.AuditEntry.count();
}
