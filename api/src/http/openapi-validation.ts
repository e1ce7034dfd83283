import { createRequire } from 'node:module';
import * as OpenApiValidator from 'express-openapi-validator';
import type { RequestHandler } from 'express';
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
  middleware: RequestHandler[];
  /** filled only when response validation is on; tests assert it stays empty */
  violations: ContractViolation[];
}

/**
 * Validates /api/v1 requests against openapi.yaml (after the body parser) and, when asked, every JSON
 * response too. A response that breaks the contract is still sent, but recorded, so one wrong field
 * fails a test instead of turning into a confusing 500.
 */
export function contractValidation(document: OpenAPIV3_1.Document, options: { validateResponses: boolean }): ContractValidation {
  const violations: ContractViolation[] = [];
  rememberCompiledPaths();
  const middleware = OpenApiValidator.middleware({
    apiSpec: structuredClone(document) as unknown as ValidatorSpec,
    validateRequests: { allowUnknownQueryParameters: false },
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
  return { middleware, violations };
}
