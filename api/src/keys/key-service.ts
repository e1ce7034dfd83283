import type { Logger } from 'pino';
import type { KeyModels } from './key-models';
import type { Principal, Scope } from '../auth/principal';
import { hashToken, KEY_PREFIX, newPartnerKey } from '../auth/tokens';
import { problems } from '../http/problem';
import { UsageCounter } from './usage-counter';
import { findKey, insertKey, listKeys, markRevoked, updateKey, usageSince, type DailyUsage, type PartnerKey } from './key-store';

/** How many days of usage a key listing shows, today included. */
export const USAGE_DAYS = 7;

/** How many days one key's usage report covers, today included. */
export const USAGE_REPORT_DAYS = 30;

export interface KeyWithUsage extends PartnerKey {
  usage: { today: number; days: DailyUsage[] };
}

const utcDay = (date: Date) => date.toISOString().slice(0, 10);

/** The UTC days from `count - 1` days before `now` up to today, oldest first. */
function lastDays(now: Date, count: number): string[] {
  return Array.from({ length: count }, (_, i) => utcDay(new Date(now.getTime() - (count - 1 - i) * 86_400_000)));
}

export function keyService(models: KeyModels, logger?: Logger) {
  const counter = new UsageCounter(models, logger);

  async function withUsage(keys: PartnerKey[]): Promise<KeyWithUsage[]> {
    const now = new Date();
    const today = utcDay(now);
    const since = utcDay(new Date(now.getTime() - (USAGE_DAYS - 1) * 86_400_000));
    const usage = await usageSince(
      models,
      keys.map((k) => k.id),
      since,
    );
    return keys.map((key) => {
      const days = usage.get(key.id) ?? [];
      return { ...key, usage: { today: days.find((d) => d.day === today)?.count ?? 0, days } };
    });
  }

  return {
    /** Creates a key; the returned secret is shown this once and only its hash is kept. */
    async create(ownerId: number, input: { name: string; scopes: Scope[]; allowedOrigins: string[] }): Promise<{ key: string; record: PartnerKey }> {
      const name = input.name.trim();
      if (name.length === 0) throw problems.invalidInput('Give the key a name.', [{ name: '/name', reason: 'must not be empty' }]);
      const scopes = [...new Set(input.scopes)].sort();
      if (scopes.length === 0) throw problems.invalidInput('Pick at least one scope.', [{ name: '/scopes', reason: 'must not be empty' }]);
      const key = newPartnerKey();
      const record = await insertKey(models, {
        ownerId,
        name,
        prefix: key.slice(0, KEY_PREFIX.length + 6),
        keyHash: hashToken(key),
        scopes,
        allowedOrigins: input.allowedOrigins,
      });
      return { key, record };
    },

    async listOwn(ownerId: number): Promise<KeyWithUsage[]> {
      return withUsage(await listKeys(models, { ownerId }));
    },

    async listAll(): Promise<KeyWithUsage[]> {
      return withUsage(await listKeys(models, {}));
    },

    /** One key with its usage, for its owner (or an admin). Someone else's key looks the same as no key. */
    async get(actor: Extract<Principal, { kind: 'user' }>, keyId: number): Promise<KeyWithUsage> {
      const key = await findKey(models, keyId);
      if (!key || (key.ownerId !== actor.userId && actor.role !== 'admin')) throw problems.notFound(`There is no partner key ${keyId} of yours.`);
      const [withDays] = await withUsage([key]);
      return withDays as KeyWithUsage;
    },

    /** The calling key itself, with its usage (the key passed the gate, so it exists and is live). */
    async current(keyId: number): Promise<KeyWithUsage> {
      const key = await findKey(models, keyId);
      if (!key) throw problems.notFound('This partner key is no longer there.');
      const [withDays] = await withUsage([key]);
      if (!withDays) throw problems.notFound('This partner key is no longer there.');
      return withDays;
    },

    /** One key's requests per UTC day over the last 30 days, every day present (0 without use); owners only. */
    async usageOf(ownerId: number, keyId: number, now = new Date()): Promise<{ key: PartnerKey; days: DailyUsage[]; total: number }> {
      const key = await findKey(models, keyId);
      if (!key || key.ownerId !== ownerId) throw problems.notFound(`There is no partner key ${keyId} of yours.`);
      const window = lastDays(now, USAGE_REPORT_DAYS);
      const counted = new Map(((await usageSince(models, [key.id], window[0] ?? utcDay(now))).get(key.id) ?? []).map((d) => [d.day, d.count]));
      const days = window.map((day) => ({ day, count: counted.get(day) ?? 0 }));
      return { key, days, total: days.reduce((sum, d) => sum + d.count, 0) };
    },

    /** Owners (or admins) rename a key or set the browser origins allowed to use it. Someone else's key looks the same as no key. */
    async update(actor: Extract<Principal, { kind: 'user' }>, keyId: number, change: { name?: string; allowedOrigins?: string[] }): Promise<KeyWithUsage> {
      const key = await findKey(models, keyId);
      if (!key || (key.ownerId !== actor.userId && actor.role !== 'admin')) throw problems.notFound(`There is no partner key ${keyId} of yours.`);
      const name = change.name?.trim();
      if (name !== undefined && name.length === 0) throw problems.invalidInput('Give the key a name.', [{ name: '/name', reason: 'must not be empty' }]);
      const updated = await updateKey(models, key.id, { name, allowedOrigins: change.allowedOrigins });
      if (!updated) throw problems.notFound(`There is no partner key ${keyId} of yours.`);
      const [withDays] = await withUsage([updated]);
      if (!withDays) throw problems.notFound(`There is no partner key ${keyId} of yours.`);
      return withDays;
    },

    /** Owners revoke their own keys; admins revoke any. Someone else's key looks the same as no key. */
    async revoke(actor: Extract<Principal, { kind: 'user' }>, keyId: number): Promise<void> {
      const key = await findKey(models, keyId);
      if (!key || (key.ownerId !== actor.userId && actor.role !== 'admin')) throw problems.notFound(`There is no partner key ${keyId} of yours.`);
      await markRevoked(models, key.id, actor.userId, new Date());
    },

    /** Counts one admitted request against the key's day (written within about a second). */
    recordUse(keyId: number): void {
      counter.record(keyId);
    },

    /** Writes the usage counted so far; the app calls it on close so no count is lost. */
    close(): Promise<void> {
      return counter.close();
    },
  };
}

export type KeyService = ReturnType<typeof keyService>;
