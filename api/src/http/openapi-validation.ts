import * as OpenApiValidator from 'express-openapi-validator';
import type { RequestHandler } from 'express';
import type { OpenAPIV3_1 } from 'openapi-types';

type ValidatorSpec = Parameters<typeof OpenApiValidator.middleware>[0]['apiSpec'];

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
