/**
 * CORS (the Fetch standard's CORS protocol) for partner apps in browsers:
 * - operations open to anonymous callers answer any origin with `*`;
 * - preflights (which carry no Authorization) for the other operations are answered for an origin
 *   some live partner key lists, echoing it;
 * - an actual request carrying a partner key from an origin the key does not list is refused (403);
 * - credentials are never allowed (`Access-Control-Allow-Credentials` is never sent).
 * Requests from the API's own origin (the web app) are left alone.
 */
import type { Request, RequestHandler, Response } from 'express';
import type { OpenAPIV3_1 } from 'openapi-types';
import { problems } from '../http/problem';
import type { KeyOriginsCache } from './key-origins-cache';

/** Request headers a browser may send (Authorization carries the key). */
export const CORS_ALLOWED_HEADERS = ['Authorization', 'Content-Type', 'Idempotency-Key', 'If-None-Match'];
/** Response headers a browser page may read. */
export const CORS_EXPOSED_HEADERS = [
  'Location',
  'ETag',
  'Retry-After',
  'RateLimit',
  'RateLimit-Policy',
  'Idempotent-Replayed',
  'X-Sylvasift-Edition',
  'WWW-Authenticate',
];
/** How long a browser may keep a preflight answer, in seconds. */
export const CORS_MAX_AGE_S = 600;

const METHODS = ['get', 'put', 'post', 'patch', 'delete'] as const;

interface RouteAccess {
  pattern: RegExp;
  /** method (upper case) → whether anonymous callers may use it */
  methods: Map<string, boolean>;
}

/** Each path of the contract with its methods and whether each is open to anonymous callers. */
function routesOf(document: OpenAPIV3_1.Document): RouteAccess[] {
  const topLevel = document.security ?? [];
  return Object.entries(document.paths ?? {}).map(([path, item]) => {
    const escaped = path.replace(/[.*+?^$()|[\]\\]/g, '\\$&').replace(/\{[^}]+\}/g, '[^/]+');
    const methods = new Map<string, boolean>();
    for (const method of METHODS) {
      const operation = item?.[method];
      if (!operation) continue;
      const security = operation.security ?? topLevel;
      const open = security.length === 0 || security.some((requirement) => Object.keys(requirement).length === 0);
      methods.set(method.toUpperCase(), open);
      if (method === 'get') methods.set('HEAD', open);
    }
    return { pattern: new RegExp(`^${escaped}/?$`), methods };
  });
}

const ownOrigin = (req: Request) => `${req.protocol}://${req.get('host') ?? ''}`;

function allowOrigin(res: Response, origin: string): void {
  res.vary('Origin');
  res.set({ 'Access-Control-Allow-Origin': origin, 'Access-Control-Expose-Headers': CORS_EXPOSED_HEADERS.join(', ') });
}

/**
 * Two steps around authentication: `beforeAuth` answers preflights and sets the headers for open
 * operations; `afterAuth` checks a partner key's own list of origins.
 */
export function partnerCors(document: OpenAPIV3_1.Document, origins: KeyOriginsCache): { beforeAuth: RequestHandler; afterAuth: RequestHandler } {
  const routes = routesOf(document);
  const routeOf = (req: Request) => {
    const path = req.originalUrl.split('?')[0] ?? '';
    return routes.find((route) => route.pattern.test(path));
  };

  const beforeAuth: RequestHandler = async (req, res, next) => {
    const origin = req.get('Origin');
    if (origin === undefined || origin === ownOrigin(req)) return next();
    res.vary('Origin');
    const route = routeOf(req);
    const requested = req.get('Access-Control-Request-Method');
    if (req.method === 'OPTIONS' && requested !== undefined) {
      const open = route?.methods.get(requested.toUpperCase());
      if (open === undefined) throw problems.notFound(`There is no ${requested.toUpperCase()} ${req.originalUrl.split('?')[0] ?? ''} for a browser to call.`);
      if (!open && !(await origins.anyKeyAllows(origin))) {
        throw problems.forbidden(`The origin ${origin} is not on any partner key's allowed origins; add it to the key with PATCH /api/v1/keys/{id}.`);
      }
      allowOrigin(res, open ? '*' : origin);
      res.set({
        'Access-Control-Allow-Methods': [...(route?.methods.keys() ?? [])].join(', '),
        'Access-Control-Allow-Headers': CORS_ALLOWED_HEADERS.join(', '),
        'Access-Control-Max-Age': String(CORS_MAX_AGE_S),
      });
      res.status(204).end();
      return;
    }
    if (route?.methods.get(req.method) === true) allowOrigin(res, '*');
    else if (await origins.anyKeyAllows(origin)) allowOrigin(res, origin);
    next();
  };

  const afterAuth: RequestHandler = async (req, res, next) => {
    const origin = req.get('Origin');
    const principal = req.principal;
    if (origin === undefined || origin === ownOrigin(req) || principal?.kind !== 'key') return next();
    if (!(await origins.keyAllows(principal.keyId, origin))) {
      res.removeHeader('Access-Control-Allow-Origin');
      res.removeHeader('Access-Control-Expose-Headers');
      throw problems.forbidden(`This partner key does not allow calls from ${origin}; add the origin to the key's allowedOrigins.`);
    }
    allowOrigin(res, origin);
    next();
  };

  return { beforeAuth, afterAuth };
}
