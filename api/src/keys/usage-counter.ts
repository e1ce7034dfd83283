/**
 * Partner-key usage counted in memory per (key, UTC day) and written in one statement about every
 * second, so a busy key costs no database write per request.
 *
 * Invariant: every counted request of a key that still exists reaches key_usage. A failed write
 * puts its counts back for the next flush; close() writes what is left; and any read of key usage or of partner keys through the
 * models waits for the counts so far (outside a transaction), so a listing never misses a request.
 */
import type { Logger } from 'pino';
import type { KeyModels } from './key-models';
import { addUsage, liveKeyIds, touchLastUsed, type UsageCount } from './key-store';

/** How often pending counts are written. */
export const USAGE_FLUSH_MS = 1000;

const utcDay = (date: Date) => date.toISOString().slice(0, 10);

export class UsageCounter {
  #pending = new Map<string, UsageCount>();
  /** the flush in progress (flushes run one after another) */
  #flushing: Promise<void> = Promise.resolve();
  readonly #timer: NodeJS.Timeout;

  constructor(
    private readonly models: KeyModels,
    private readonly logger?: Logger,
    flushEveryMs = USAGE_FLUSH_MS,
  ) {
    this.#timer = setInterval(() => void this.flush(), flushEveryMs);
    this.#timer.unref();
    const waitForCounts = async (options?: { transaction?: unknown }) => {
      if (!options?.transaction) await this.flush();
    };
    models.KeyUsage.addHook('beforeFind', waitForCounts);
    models.PartnerKey.addHook('beforeFind', waitForCounts);
  }

  /** Counts one request against the key's day. */
  record(keyId: number, now = new Date()): void {
    const day = utcDay(now);
    const slot = `${keyId} ${day}`;
    const counted = this.#pending.get(slot);
    if (counted) {
      counted.count++;
      counted.lastUsedAt = now;
    } else {
      this.#pending.set(slot, { keyId, day, count: 1, lastUsedAt: now });
    }
  }

  /** Writes the counts so far; resolves once they (and any earlier flush) are in the database. */
  flush(): Promise<void> {
    this.#flushing = this.#flushing.then(() => this.#write());
    return this.#flushing;
  }

  /** Stops the timer and writes what is left. */
  async close(): Promise<void> {
    clearInterval(this.#timer);
    await this.flush();
  }

  async #write(): Promise<void> {
    if (this.#pending.size === 0) return;
    const batch = [...this.#pending.values()];
    this.#pending = new Map();
    try {
      await addUsage(this.models, batch, new Date());
    } catch (error) {
      await this.#putBack(batch, error);
      return;
    }
    // a missed last-used time is only bookkeeping: the counts above are in, so it is not retried
    await touchLastUsed(this.models, batch).catch((error: unknown) => this.logger?.error({ err: error }, 'could not record when partner keys were last used'));
  }

  /**
   * Keeps a batch that could not be written for the next flush, except the counts of keys deleted
   * since (a restore or a cleanup): those can never be written and would hold back everyone else's.
   */
  async #putBack(batch: readonly UsageCount[], error: unknown): Promise<void> {
    const live = await liveKeyIds(this.models, batch).catch(() => undefined);
    for (const counted of batch) {
      if (live && !live.has(counted.keyId)) continue;
      const slot = `${counted.keyId} ${counted.day}`;
      const later = this.#pending.get(slot);
      if (later) {
        later.count += counted.count;
      } else {
        this.#pending.set(slot, counted);
      }
    }
    this.logger?.error({ err: error }, 'could not write partner-key usage; kept for the next flush');
  }
}
