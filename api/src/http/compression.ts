import { promisify } from 'node:util';
import { brotliCompress, constants, gzip } from 'node:zlib';
import compression from 'compression';
import type { Request, RequestHandler } from 'express';

/**
 * Text compression for answers built at request time. Static files of the web app come compressed
 * from the build (see web-routes.ts); the edition bundle keeps one compressed copy per edition (see
 * `compressedVariant`). Identify answers are left alone: they are short, computed per call on
 * worker threads, and compressing them on the request thread would cost throughput for little.
 */

/** Below this a compressed answer saves less than a packet on the wire, and costs CPU (common practice, no source). */
export const COMPRESSION_THRESHOLD_BYTES = 1024;

/** Routes whose answers are never compressed on the fly (prebuilt bytes from worker threads). */
const UNCOMPRESSED_PATHS = ['/api/v1/identify'];

/** brotli and gzip for dynamic answers above the threshold; brotli at a quality cheap enough per request */
export function dynamicCompression(): RequestHandler {
  const compress = compression({
    threshold: COMPRESSION_THRESHOLD_BYTES,
    // quality 4: most of brotli's gain at gzip-like cost (zlib's default is 11, meant for build time)
    brotli: { params: { [constants.BROTLI_PARAM_QUALITY]: 4 } },
  });
  // Skipped before the middleware wraps the response at all, so those routes pay nothing for it.
  return (req, res, next) => {
    if (UNCOMPRESSED_PATHS.some((prefix) => req.path === prefix || req.path.startsWith(`${prefix}/`))) next();
    else compress(req, res, next);
  };
}

export type ContentCoding = 'br' | 'gzip';

/** The coding to answer with, from the request's Accept-Encoding (brotli first, as it is smaller); null for none. */
export function preferredCoding(req: Request): ContentCoding | null {
  // Browsers list gzip first with no weights, so the server's preference decides among accepted ones.
  if (req.acceptsEncodings('br') === 'br') return 'br';
  if (req.acceptsEncodings('gzip') === 'gzip') return 'gzip';
  return null;
}

const brotliAsync = promisify(brotliCompress);
const gzipAsync = promisify(gzip);

/**
 * brotli at its best quality and gzip at level 9, for bytes compressed once and sent many times.
 * Runs on libuv's thread pool: a 250 kB bundle takes about a second at brotli's best quality.
 */
export function compressOnce(bytes: Uint8Array, coding: ContentCoding): Promise<Buffer> {
  return coding === 'br'
    ? brotliAsync(bytes, { params: { [constants.BROTLI_PARAM_QUALITY]: constants.BROTLI_MAX_QUALITY, [constants.BROTLI_PARAM_SIZE_HINT]: bytes.byteLength } })
    : gzipAsync(bytes, { level: 9 });
}

const variants = new WeakMap<Uint8Array, Map<ContentCoding, Promise<Buffer>>>();

/**
 * The compressed copy of an immutable byte array (such as one edition's bundle), made once on first
 * use (callers meanwhile share the one compression) and kept for as long as the array itself is kept.
 */
export function compressedVariant(bytes: Uint8Array, coding: ContentCoding): Promise<Buffer> {
  let perCoding = variants.get(bytes);
  if (!perCoding) {
    perCoding = new Map();
    variants.set(bytes, perCoding);
  }
  let compressed = perCoding.get(coding);
  if (!compressed) {
    compressed = compressOnce(bytes, coding);
    // a failed compression is not kept: the next request tries again
    compressed.catch(() => perCoding.delete(coding));
    perCoding.set(coding, compressed);
  }
  return compressed;
}

/**
 * The entity tag of a compressed representation: the identity tag with the coding appended inside
 * the quotes. Strong, like the identity one, since each coding's bytes are fixed for the edition, but
 * distinct from it, since the bytes differ (RFC 9110 §8.8.3).
 */
export function codedTag(etag: string, coding: ContentCoding): string {
  return etag.replace(/"$/, `-${coding}"`);
}
