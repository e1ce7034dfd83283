import { createRequire } from 'node:module';
import * as OpenApiValidator from 'express-openapi-validator';
import type { ErrorRequestHandler, Request, RequestHandler } from 'express';
import type { OpenAPIV3_1 } from 'openapi-types';

type ValidatorSpec = Parameters<typeof OpenApiValidator.middleware>[0]['apiSpec'];

interface CompiledPath {
  regexp: RegExp;
  keys: unknown[];
}
type PathToRegexp = (path: unknown, options?: Record<string, unknown>) => CompiledPath;
interface PathToRegexpModule {
  pathToRegexp: PathToRegexp;
}

/** The path-to-regexp the validator loads (resolved from the validator's own package, as Node would). */
function validatorsPathToRegexp(): PathToRegexpModule {
  const fromValidator = createRequire(createRequire(import.meta.url).resolve('express-openapi-validator'));
  return fromValidator('path-to-regexp') as PathToRegexpModule;
}

const REMEMBERED = Symbol.for('sylvasift.rememberedPathToRegexp');
const rememberedPatterns = new Map<string, CompiledPath>();
/** the contract has a few dozen paths; past this, patterns are compiled afresh rather than kept */
const MOST_REMEMBERED = 1000;

/**
 * The validator finds a request's operation by compiling the pattern of each documented path in
 * turn, on every request, until one matches: most of its cost per request. Compiling is a pure
 * function of the path and the options, so the compiled patterns are remembered; callers only read
 * them (the patterns carry no global or sticky flag, so sharing one RegExp keeps no state).
 */
export function rememberCompiledPaths(): { patterns: () => number } {
  const module = validatorsPathToRegexp();
  const current = module.pathToRegexp as PathToRegexp & { [REMEMBERED]?: true };
  if (!current[REMEMBERED]) {
    const compile = current;
    const remembering = ((path, options) => {
      if (typeof path !== 'string') return compile(path, options);
      let key = path;
      for (const name in options) {
        const value = options[name];
        // options that are objects or functions (custom encoders) are not compared; compile those afresh
        if ((typeof value === 'object' && value !== null) || typeof value === 'function') return compile(path, options);
        key += `\u0000${name}=${String(value)}`;
      }
      let compiled = rememberedPatterns.get(key);
      if (!compiled) {
        compiled = compile(path, options);
        if (rememberedPatterns.size < MOST_REMEMBERED) rememberedPatterns.set(key, compiled);
      }
      return compiled;
    }) as PathToRegexp & { [REMEMBERED]?: true };
    remembering[REMEMBERED] = true;
    module.pathToRegexp = remembering;
  }
  return { patterns: () => rememberedPatterns.size };
}

/** Largest file the multipart routes (photos, matrix imports) accept; each route may set a lower limit. */
export const MAX_UPLOAD_BYTES = 8 * 1024 * 1024;

/** One response that did not match the contract: which route, which status, what was wrong. */
export interface ContractViolation {
  method: string;
  path: string;
  status: number;
  message: string;
}

export interface ContractValidation {
  middleware: Array<RequestHandler | ErrorRequestHandler>;
  /** filled only when response validation is on; tests assert it stays empty */
  violations: ContractViolation[];
}

const METHODS = ['get', 'put', 'post', 'delete', 'options', 'head', 'patch', 'trace'] as const;

/** The methods each documented path answers, HEAD wherever GET is (RFC 9110 §9.3.2), for `Allow` on a 405. */
export function allowedMethods(document: OpenAPIV3_1.Document): (path: string) => string[] | undefined {
  const table = Object.entries(document.paths ?? {}).map(([template, item]) => {
    // documented paths are letters, digits, '-', '/' and {parameters}: nothing else needs escaping
    const pattern = new RegExp(`^${template.replace(/\{[^}]+\}/g, '[^/]+')}/?$`);
    const methods = METHODS.filter((method) => item?.[method] !== undefined).map((method) => method.toUpperCase());
    if (methods.includes('GET') && !methods.includes('HEAD')) methods.splice(methods.indexOf('GET') + 1, 0, 'HEAD');
    // literal paths (editions/current/bundle) win over templated ones (editions/{number}) as they do in the validator
    return { pattern, methods, literal: !template.includes('{') };
  });
  table.sort((a, b) => Number(b.literal) - Number(a.literal));
  return (path) => table.find((row) => row.pattern.test(path))?.methods;
}

/** HEAD is answered wherever GET is: the validator sees a GET, Express sends the GET's headers without the body. */
const headAsGet: RequestHandler = (req, _res, next) => {
  if (req.method === 'HEAD') {
    req.method = 'GET';
    (req as Request & { wasHead?: boolean }).wasHead = true;
  }
  next();
};
const headRestored: RequestHandler = (req, _res, next) => {
  if ((req as Request & { wasHead?: boolean }).wasHead) req.method = 'HEAD';
  next();
};
const headRestoredOnError: ErrorRequestHandler = (error, req, _res, next) => {
  if ((req as Request & { wasHead?: boolean }).wasHead) req.method = 'HEAD';
  next(error);
};

/**
 * Validates /api/v1 requests against openapi.yaml (after the body parser) and, when asked, every JSON
 * response too. A response that breaks the contract is still sent, but recorded, so one wrong field
 * fails a test instead of turning into a confusing 500.
 */
export interface ContractValidationOptions {
  validateResponses: boolean;
  /**
   * Runs once the validator knows the operation (`req.openapi.schema`) and before it reads the body:
   * the place for who-may-call checks, so a caller who may not use an operation never hears about its body.
   */
  beforeBodyValidation?: (document: OpenAPIV3_1.Document) => RequestHandler;
}

export function contractValidation(document: OpenAPIV3_1.Document, options: ContractValidationOptions): ContractValidation {
  const violations: ContractViolation[] = [];
  rememberCompiledPaths();
  const middleware = OpenApiValidator.middleware({
    apiSpec: structuredClone(document) as unknown as ValidatorSpec,
    // bodies are never coerced: a count sent as "3" or a flag sent as "true" is refused, not guessed at
    validateRequests: { allowUnknownQueryParameters: false, coerceTypes: false },
    validateResponses: options.validateResponses
      ? {
          onError: (error, _body, req) => {
            violations.push({ method: req.method, path: req.originalUrl, status: req.res?.statusCode ?? 0, message: error.message });
          },
        }
      : false,
    validateSecurity: false,
    validateFormats: true,
    ignorePaths: (path: string) => !path.startsWith('/api/v1/'),
    fileUploader: { limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 10 } },
  }) as unknown as RequestHandler[];
  // the validator's chain: path params, metadata (finds the operation), security, multipart, request, response
  const afterSecurity = middleware.findIndex((handler) => handler.name === 'securityMiddleware') + 1;
  if (options.beforeBodyValidation) middleware.splice(afterSecurity, 0, options.beforeBodyValidation(document));
  const allowed = allowedMethods(document);
  const allowOn405: ErrorRequestHandler = (error: { status?: number }, req, res, next) => {
    const methods = error.status === 405 ? allowed(req.path) : undefined;
    if (methods) res.set('Allow', methods.join(', '));
    next(error);
  };
  return { middleware: [headAsGet, ...middleware, headRestored, headRestoredOnError, allowOn405], violations };
}
