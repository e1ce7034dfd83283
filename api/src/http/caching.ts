import type { Response } from 'express';

/**
 * Cache policies of the read routes. Express adds a strong ETag to every body it sends and answers
 * a matching If-None-Match with 304 itself, so routes only state how long and for whom.
 */
export const cachePolicy = {
  /** published data anyone may read: shared caches may keep it briefly, keyed by the credentials sent */
  publicLookup(res: Response): void {
    res.set('Cache-Control', 'public, max-age=60, must-revalidate');
    res.vary('Authorization');
  },
  /** the edition bundle: immutable per edition, but "current" moves, so revalidate after a few minutes */
  bundle(res: Response): void {
    res.set('Cache-Control', 'public, max-age=300, must-revalidate');
  },
  /** answers computed for one caller (identify, compare): never stored */
  noStore(res: Response): void {
    res.set('Cache-Control', 'no-store');
  },
  /** curator views: only the caller's own cache, and always revalidated */
  privateRevalidate(res: Response): void {
    res.set('Cache-Control', 'private, no-cache');
    res.vary('Authorization');
  },
} as const;
