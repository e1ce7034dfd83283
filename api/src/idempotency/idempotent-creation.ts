/**
 * `Idempotency-Key` on the POSTs that create things (draft-ietf-httpapi-idempotency-key-header):
 * the first request with a key does the work and its successful answer is kept for 24 hours; a
 * repeat by the same caller with the same request gets that answer again (status, body, Location,
 * and `Idempotent-Replayed: true`) without the work being done twice. The same key with another
 * request is refused (422), and a repeat while the first is still being handled gets 409.
 * Refused or failed requests are not kept, so they may be sent again with the same key.
 *
 * Kept answers can hold what is shown only once (a new partner key's secret), so the database holds
 * them encrypted with a key derived from the Idempotency-Key itself, which only the caller knows,
 * and holds the Idempotency-Key only as a hash.
 */
import { createCipheriv, createDecipheriv, createHash, hkdfSync, randomBytes } from 'node:crypto';
import type { Request, RequestHandler } from 'express';
import type { Logger } from 'pino';
import type { Principal } from '../auth/principal';
import { HttpProblem, problems } from '../http/problem';
import type { IdempotencyModels } from './idempotency-models';
import { claimKey, findAnswer, keepAnswer, releaseKey } from './idempotency-store';

/** How long a key's answer is kept. */
export const IDEMPOTENCY_TTL_MS = 24 * 3_600_000;

/** A key is 1–255 visible ASCII characters, optionally sent as a quoted structured-field string. */
const KEY_PATTERN = /^[\x21-\x7e]{1,255}$/;

interface SealedBody {
  iv: string;
  tag: string;
  data: string;
}

const callerOf = (principal: Principal): string => (principal.kind === 'user' ? `user:${principal.userId}` : `key:${principal.keyId}`);

const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');

/** The header's value without structured-field quotes, or undefined when it is not a usable key. */
function idempotencyKeyOf(req: Request): string | undefined {
  const raw = req.get('Idempotency-Key');
  if (raw === undefined) return undefined;
  const value = raw.trim().replace(/^"(.*)"$/, '$1');
  if (!KEY_PATTERN.test(value)) {
    throw problems.invalidInput('Idempotency-Key must be 1 to 255 visible ASCII characters (a UUID is a good choice).', [
      { name: '/header/idempotency-key', reason: 'not a usable key' },
    ]);
  }
  return value;
}

/** JSON with object keys sorted, so the same body always has the same fingerprint. */
function canonical(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(canonical);
  if (value !== null && typeof value === 'object' && !Buffer.isBuffer(value)) {
    return Object.fromEntries(
      Object.entries(value as Record<string, unknown>)
        .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
        .map(([k, v]) => [k, canonical(v)]),
    );
  }
  return value;
}

/** What the request asks for: method, path, query, body and uploaded files' contents. */
function fingerprintOf(req: Request): string {
  const files = ((req.files ?? []) as Array<{ fieldname: string; buffer: Buffer }>).map((file) => [
    file.fieldname,
    createHash('sha256').update(file.buffer).digest('hex'),
  ]);
  return sha256(JSON.stringify(canonical({ method: req.method, path: req.baseUrl + req.path, query: req.query, body: req.body ?? null, files })));
}

function sealingKey(idempotencyKey: string, caller: string): Buffer {
  return Buffer.from(hkdfSync('sha256', idempotencyKey, caller, 'sylvasift idempotent answer', 32));
}

function seal(body: unknown, key: Buffer): SealedBody {
  const iv = randomBytes(12);
  const cipher = createCipheriv('aes-256-gcm', key, iv);
  const data = Buffer.concat([cipher.update(JSON.stringify(body) ?? 'null', 'utf8'), cipher.final()]);
  return { iv: iv.toString('base64'), tag: cipher.getAuthTag().toString('base64'), data: data.toString('base64') };
}

function unseal(sealed: unknown, key: Buffer): unknown {
  const { iv, tag, data } = sealed as SealedBody;
  const decipher = createDecipheriv('aes-256-gcm', key, Buffer.from(iv, 'base64'));
  decipher.setAuthTag(Buffer.from(tag, 'base64'));
  return JSON.parse(Buffer.concat([decipher.update(Buffer.from(data, 'base64')), decipher.final()]).toString('utf8')) as unknown;
}

/** The middleware for creating POSTs; mount it after authentication and contract validation. */
export function idempotentCreation(models: IdempotencyModels, logger?: Logger): RequestHandler {
  return async (req, res, next) => {
    const rawKey = idempotencyKeyOf(req);
    const principal = req.principal;
    // without a key there is nothing to keep; without a caller the route's guard refuses anyway
    if (rawKey === undefined || !principal) return next();
    const caller = callerOf(principal);
    const idempotencyKey = sha256(rawKey);
    const fingerprint = fingerprintOf(req);
    const sealWith = sealingKey(rawKey, caller);
    const now = new Date();

    const earlier = await findAnswer(models, caller, idempotencyKey, now);
    if (earlier || !(await claimKey(models, { caller, idempotencyKey, fingerprint, expiresAt: new Date(now.getTime() + IDEMPOTENCY_TTL_MS) }, now))) {
      const held = earlier ?? (await findAnswer(models, caller, idempotencyKey, now));
      if (held && held.fingerprint !== fingerprint) {
        throw new HttpProblem(
          422,
          'idempotency-key-reused',
          'Idempotency-Key used for another request',
          'This Idempotency-Key was sent before with another request; use a new key for a new request.',
        );
      }
      if (!held?.answer) throw problems.conflict('A request with this Idempotency-Key is still being handled; wait for its answer.');
      res.status(held.answer.status).set({ 'Idempotent-Replayed': 'true', 'Cache-Control': 'no-store' });
      if (held.answer.location !== null) res.location(held.answer.location);
      res.json(unseal(held.answer.body, sealWith));
      return;
    }

    // the key is claimed: keep a successful answer before it is sent, free the key otherwise
    let settled = false;
    const send = res.json.bind(res);
    res.json = (body: unknown) => {
      settled = true;
      res.json = send;
      const status = res.statusCode;
      const location = res.get('Location') ?? null;
      const settleThenSend = async () => {
        try {
          if (status >= 200 && status < 300) await keepAnswer(models, caller, idempotencyKey, { status, location, body: seal(body, sealWith) });
          else await releaseKey(models, caller, idempotencyKey);
        } catch (error) {
          logger?.error({ err: error }, 'could not keep the answer to an Idempotency-Key');
        }
        send(body);
      };
      settleThenSend().catch((error: unknown) => logger?.error({ err: error }, 'could not send the answer to an Idempotency-Key request'));
      return res;
    };
    res.on('close', () => {
      if (!settled) releaseKey(models, caller, idempotencyKey).catch((error: unknown) => logger?.error({ err: error }, 'could not free an Idempotency-Key'));
    });
    next();
  };
}
