import { problems } from '../http/problem';

/** How many browser origins one key may list. */
export const MAX_ALLOWED_ORIGINS = 20;

/**
 * A key's allowed origins as sent: each a serialised origin (RFC 6454 §6.2) with an http or https
 * scheme — `https://trail.example` or `http://localhost:4200`, no path, no trailing slash, no `*`.
 * Answers them without duplicates, sorted.
 */
export function allowedOriginsField(value: unknown): string[] {
  if (!Array.isArray(value))
    throw problems.invalidInput('allowedOrigins must be a list of origins.', [{ name: '/allowedOrigins', reason: 'must be an array' }]);
  if (value.length > MAX_ALLOWED_ORIGINS) {
    throw problems.invalidInput(`A key may list at most ${MAX_ALLOWED_ORIGINS} origins.`, [
      { name: '/allowedOrigins', reason: `more than ${MAX_ALLOWED_ORIGINS}` },
    ]);
  }
  const origins = value.map((entry: unknown, i) => {
    const bad = () =>
      problems.invalidInput('Each allowed origin is a scheme, host and optional port, like https://trail.example (no path, no trailing slash).', [
        { name: `/allowedOrigins/${i}`, reason: 'not an origin' },
      ]);
    if (typeof entry !== 'string') throw bad();
    let url: URL;
    try {
      url = new URL(entry);
    } catch {
      throw bad();
    }
    if ((url.protocol !== 'https:' && url.protocol !== 'http:') || url.origin !== entry) throw bad();
    return entry;
  });
  return [...new Set(origins)].sort();
}
