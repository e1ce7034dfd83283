import type { ErrorRequestHandler, Request, RequestHandler } from 'express';
import { MAX_UPLOAD_BYTES } from './openapi-validation';
import { HttpProblem, problems, type InvalidParam } from './problem';

interface HttpErrorLike {
  status?: number;
  statusCode?: number;
  type?: string;
  message?: string;
  /** body-parser: the most bytes the body may have, and how many it had */
  limit?: number;
  length?: number;
  errors?: Array<{ path?: string; message?: string }>;
}

/** What a problem's detail may say about the request it answers. */
export interface RequestFacts {
  /** the Content-Type the request carried, if any */
  contentType?: string;
  /** the media types the operation's body may have, as openapi.yaml lists them */
  expectedTypes?: string[];
}

/** A byte count as people read it: 256 kB, 8 MB. */
function sizeInWords(bytes: number): string {
  if (bytes >= 1024 * 1024 && bytes % (1024 * 1024) === 0) return `${bytes / 1024 / 1024} MB`;
  if (bytes >= 1024 && bytes % 1024 === 0) return `${bytes / 1024} kB`;
  return `${bytes} bytes`;
}

function unsupportedMediaType(facts: RequestFacts, fallback: string): HttpProblem {
  const expected = facts.expectedTypes && facts.expectedTypes.length > 0 ? facts.expectedTypes.join(' or ') : undefined;
  if (!facts.contentType) {
    return problems.unsupportedMediaType(`The request has a body but no Content-Type header${expected ? `; send it as ${expected}` : ''}.`);
  }
  return problems.unsupportedMediaType(expected ? `This endpoint takes ${expected}, not ${facts.contentType}.` : fallback);
}

function isHttpErrorLike(error: unknown): error is HttpErrorLike {
  return typeof error === 'object' && error !== null;
}

/** Maps anything thrown below the routes to a problem: domain problems, body-parser and validator errors, the rest as 500. */
export function toProblem(error: unknown, facts: RequestFacts = {}): HttpProblem {
  if (error instanceof HttpProblem) return error;
  if (!isHttpErrorLike(error)) return problems.internal();
  const status = error.status ?? error.statusCode;
  if (error.type === 'entity.parse.failed') return problems.malformedJson('The request body is not valid JSON.');
  if (error.type === 'entity.too.large') {
    const limit = typeof error.limit === 'number' ? ` at most ${sizeInWords(error.limit)} (${error.limit} bytes)` : ' smaller';
    const sent = typeof error.length === 'number' ? `; this one has ${error.length} bytes` : '';
    return problems.payloadTooLarge(`The request body must be${limit}${sent}.`);
  }
  if (error.type === 'encoding.unsupported' || error.type === 'charset.unsupported') {
    return problems.unsupportedMediaType(error.message ?? 'Unsupported request encoding.');
  }
  if (status === 400 && Array.isArray(error.errors)) {
    const invalid: InvalidParam[] = error.errors.map((e) => ({ name: e.path ?? '', reason: e.message ?? 'invalid' }));
    return problems.invalidInput(error.message ?? 'The request does not match the API contract.', invalid);
  }
  if (status === 404) return problems.notFound(error.message ?? 'Not found.');
  if (status === 405) return problems.methodNotAllowed(error.message ?? 'Method not allowed.');
  // the only other 413 is the multipart upload limit (a route may set a lower one of its own)
  if (status === 413) return problems.payloadTooLarge(`An uploaded file may be at most ${sizeInWords(MAX_UPLOAD_BYTES)} (${MAX_UPLOAD_BYTES} bytes).`);
  if (status === 415) return unsupportedMediaType(facts, error.message ?? 'Unsupported media type.');
  if (typeof status === 'number' && status >= 400 && status < 500) {
    return new HttpProblem(status, 'client-error', 'Request error', error.message ?? 'The request could not be handled.');
  }
  return problems.internal();
}

function requestFacts(req: Request): RequestFacts {
  const operation = (req as Request & { openapi?: { schema?: { requestBody?: { content?: Record<string, unknown> } } } }).openapi?.schema;
  const content = operation?.requestBody?.content;
  return { contentType: req.headers['content-type'], expectedTypes: content ? Object.keys(content) : undefined };
}

/** The one four-argument error handler: every API error leaves as application/problem+json. */
export const problemErrorHandler: ErrorRequestHandler = (error, req, res, next) => {
  if (res.headersSent) {
    next(error);
    return;
  }
  const problem = toProblem(error, requestFacts(req));
  // 503 is a state the caller is told about (nothing published yet, identify busy), not a fault
  if (problem.status === 503) req.log?.warn({ problem: problem.slug }, problem.detail);
  else if (problem.status >= 500) req.log?.error({ err: error }, 'unhandled error');
  res.status(problem.status).type('application/problem+json').json(problem.toBody(req.originalUrl));
};

/** Unknown routes under /api answer 404 as a problem instead of falling through to the web app. */
export const apiNotFound: RequestHandler = (req) => {
  throw problems.notFound(`There is no API route ${req.method} ${req.path}.`);
};
