import { Op, UniqueConstraintError } from 'sequelize';
import type { IdempotencyModels } from './idempotency-models';

/** What was kept of one Idempotency-Key: the request it stood for and, once answered, the answer. */
export interface StoredAnswer {
  fingerprint: string;
  /** null while the first request is still being handled */
  answer: { status: number; location: string | null; body: unknown } | null;
}

/** The caller's record for this key, unless it has expired. */
export async function findAnswer(models: IdempotencyModels, caller: string, idempotencyKey: string, now: Date): Promise<StoredAnswer | undefined> {
  const row = await models.IdempotencyRecord.findOne({ where: { caller, idempotencyKey, expiresAt: { [Op.gt]: now } } });
  if (!row) return undefined;
  return { fingerprint: row.fingerprint, answer: row.status === null ? null : { status: row.status, location: row.location, body: row.body } };
}

/**
 * Claims the key for a request being handled (no answer yet), first clearing expired records.
 * False when the caller already holds a live record for it (a request that came in at the same time).
 */
export async function claimKey(
  models: IdempotencyModels,
  record: { caller: string; idempotencyKey: string; fingerprint: string; expiresAt: Date },
  now: Date,
): Promise<boolean> {
  await models.IdempotencyRecord.destroy({ where: { expiresAt: { [Op.lte]: now } } });
  try {
    await models.IdempotencyRecord.create({ ...record, status: null, location: null, body: null });
    return true;
  } catch (error) {
    if (error instanceof UniqueConstraintError) return false;
    throw error;
  }
}

/** Keeps the answer for the claimed key. */
export async function keepAnswer(
  models: IdempotencyModels,
  caller: string,
  idempotencyKey: string,
  answer: { status: number; location: string | null; body: unknown },
): Promise<void> {
  await models.IdempotencyRecord.update(
    { status: answer.status, location: answer.location, body: answer.body },
    { where: { caller, idempotencyKey, status: null } },
  );
}

/** Frees a claimed key whose request was not answered with success, so it can be sent again. */
export async function releaseKey(models: IdempotencyModels, caller: string, idempotencyKey: string): Promise<void> {
  await models.IdempotencyRecord.destroy({ where: { caller, idempotencyKey, status: null } });
}
