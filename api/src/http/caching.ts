import type { Request, Response } from 'express';

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

/**
 * Whether the request's If-None-Match names `etag` (weak comparison, RFC 9110 §13.1.2; `*` matches
 * any). Express's own check gives up when the request says `Cache-Control: no-cache`, as fetch()
 * sends on a reload; but that directive asks caches to revalidate, and revalidating with the origin
 * is exactly this, so the origin still answers 304 (RFC 9111 §5.2.1.4, RFC 9110 §13.1.2).
 */
export function matchesIfNoneMatch(req: Request, ...etags: string[]): boolean {
  const header = req.headers['if-none-match'];
  if (!header) return false;
  const opaque = (tag: string) => tag.trim().replace(/^W\//, '');
  const ours = new Set(etags.map(opaque));
  return header.split(',').some((tag) => tag.trim() === '*' || ours.has(opaque(tag)));
}
