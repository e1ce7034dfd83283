import type { KeyModels } from '../keys/key-models';
import { liveKeyOrigins } from '../keys/key-store';

/** How long the origins read from the database are trusted when no write was seen (other processes). */
export const KEY_ORIGINS_TTL_MS = 10_000;

/**
 * The allowed origins of every live partner key, read once and kept until a key is written through
 * these models (or, for writes by other processes, for KEY_ORIGINS_TTL_MS).
 */
export class KeyOriginsCache {
  #loaded: Promise<Map<number, string[]>> | undefined;
  #loadedAt = 0;

  constructor(private readonly models: KeyModels) {
    const forget = () => {
      this.#loaded = undefined;
    };
    for (const hook of ['afterCreate', 'afterUpdate', 'afterBulkUpdate', 'afterDestroy', 'afterBulkDestroy'] as const) models.PartnerKey.addHook(hook, forget);
  }

  async #byKey(): Promise<Map<number, string[]>> {
    if (!this.#loaded || Date.now() - this.#loadedAt > KEY_ORIGINS_TTL_MS) {
      this.#loadedAt = Date.now();
      const loading = liveKeyOrigins(this.models);
      this.#loaded = loading;
      loading.catch(() => {
        if (this.#loaded === loading) this.#loaded = undefined;
      });
    }
    return this.#loaded;
  }

  /** Whether some live key lists the origin. */
  async anyKeyAllows(origin: string): Promise<boolean> {
    for (const origins of (await this.#byKey()).values()) if (origins.includes(origin)) return true;
    return false;
  }

  /** Whether this key lists the origin. */
  async keyAllows(keyId: number, origin: string): Promise<boolean> {
    return ((await this.#byKey()).get(keyId) ?? []).includes(origin);
  }
}
