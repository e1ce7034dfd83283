/**
 * Principals by token hash, kept for a few seconds so a busy partner key or session is not looked up
 * on every request.
 *
 * Invariant: in this process no entry outlives a write that could change what it says. Any update or
 * delete of users, sessions or partner keys through the models (sign-out, password change, key
 * revocation, deactivation, role or name change) empties the cache, again when its transaction
 * commits, and a lookup that raced such a write is not stored. Other API processes sharing the
 * database learn of the write only when their entries expire: up to PRINCIPAL_CACHE_MS later.
 */
import type { Model, ModelStatic, Transaction } from 'sequelize';
import type { AccountModels } from '../accounts/account-models';
import type { KeyModels } from '../keys/key-models';
import type { Principal } from '../auth/principal';

/** How long a looked-up principal is trusted: the most another process may lag a revocation. */
export const PRINCIPAL_CACHE_MS = 5000;
/** Most entries kept; past it the oldest go first. */
const MAX_ENTRIES = 10_000;
/** Columns whose writes cannot change a principal (bookkeeping of use and sign-in). */
const BOOKKEEPING = new Set(['lastUsedAt', 'lastSignInAt', 'updatedAt']);

/** A principal with the moment it must be looked up again (a session's own expiry if sooner). */
export interface Found {
  principal: Principal;
  validUntil: Date;
}

interface Entry {
  principal: Principal;
  expiresAt: number;
}

interface WriteOptions {
  fields?: readonly PropertyKey[];
  transaction?: Transaction | null;
}

export class PrincipalCache {
  readonly #entries = new Map<string, Entry>();
  /** bumped by every invalidation, so a lookup that started before one is not stored */
  #generation = 0;

  constructor(private readonly ttlMs = PRINCIPAL_CACHE_MS) {}

  /** The cached principal, or undefined when absent or expired. */
  get(tokenHash: string, now = Date.now()): Principal | undefined {
    const entry = this.#entries.get(tokenHash);
    if (!entry) return undefined;
    if (entry.expiresAt <= now) {
      this.#entries.delete(tokenHash);
      return undefined;
    }
    return entry.principal;
  }

  /** Looks a token hash up, from the cache or with `find`; only found principals are kept. */
  async resolve(tokenHash: string, find: () => Promise<Found | undefined>): Promise<Principal | undefined> {
    const cached = this.get(tokenHash);
    if (cached) return cached;
    const generation = this.#generation;
    const found = await find();
    if (!found) return undefined;
    if (generation === this.#generation) {
      if (this.#entries.size >= MAX_ENTRIES) this.#entries.delete(this.#entries.keys().next().value as string);
      this.#entries.set(tokenHash, { principal: found.principal, expiresAt: Math.min(Date.now() + this.ttlMs, found.validUntil.getTime()) });
    }
    return found.principal;
  }

  /** Forgets every entry (after a write that may change principals, or a restore). */
  clear(): void {
    this.#generation++;
    this.#entries.clear();
  }

  /** Empties the cache on every write to users, sessions and partner keys that could change a principal. */
  watch(models: AccountModels & KeyModels): this {
    const invalidate = (options: WriteOptions | undefined) => {
      if (options?.fields && options.fields.every((field) => typeof field === 'string' && BOOKKEEPING.has(field))) return;
      this.clear();
      // readers outside the transaction still see the old rows until it commits
      options?.transaction?.afterCommit(() => this.clear());
    };
    const watched = [models.User, models.Session, models.PartnerKey] as unknown as Array<ModelStatic<Model>>;
    for (const model of watched) {
      model.addHook('afterBulkUpdate', (options: WriteOptions) => invalidate(options));
      model.addHook('afterBulkDestroy', (options: WriteOptions) => invalidate(options));
      model.addHook('afterUpdate', (_instance: Model, options: WriteOptions) => invalidate(options));
      model.addHook('afterDestroy', (_instance: Model, options: WriteOptions) => invalidate(options));
      model.addHook('afterUpsert', (_result: unknown, options: WriteOptions) => invalidate({ transaction: options.transaction ?? null }));
    }
    return this;
  }
}
