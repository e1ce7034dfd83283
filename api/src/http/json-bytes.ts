import type { Response } from 'express';

/**
 * Sends an answer already serialised to UTF-8 JSON (off the request thread) as `application/json`.
 * Unlike res.send it computes no entity tag: this is for answers to POST, which no cache stores
 * and no client asks for conditionally, so hashing them would be wasted work.
 */
export function sendJsonBytes(res: Response, body: Uint8Array): void {
  res.status(200);
  res.set('Content-Type', 'application/json; charset=utf-8');
  res.set('Content-Length', String(body.byteLength));
  res.end(Buffer.from(body.buffer, body.byteOffset, body.byteLength));
}
