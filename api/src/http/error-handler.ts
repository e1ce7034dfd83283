import type { ErrorRequestHandler, RequestHandler } from 'express';
import { HttpProblem, problems, type InvalidParam } from './problem';

interface HttpErrorLike {
  status?: number;
  statusCode?: number;
  type?: string;
  message?: string;
  errors?: Array<{ path?: string; message?: string }>;
}

function isHttpErrorLike(error: unknown): error is HttpErrorLike {
  return typeof error === 'object' && error !== null;
}

/** Maps anything thrown below the routes to a problem: domain problems, body-parser and validator errors, the rest as 500. */
export function toProblem(error: unknown): HttpProblem {
  if (error instanceof HttpProblem) return error;
  if (!isHttpErrorLike(error)) return problems.internal();
  const status = error.status ?? error.statusCode;
  if (error.type === 'entity.parse.failed') return problems.malformedJson('The request body is not valid JSON.');
  if (error.type === 'entity.too.large') return problems.payloadTooLarge('The request body is larger than this endpoint accepts.');
  if (error.type === 'encoding.unsupported' || error.type === 'charset.unsupported') {
    return problems.unsupportedMediaType(error.message ?? 'Unsupported request encoding.');
  }
  if (status === 400 && Array.isArray(error.errors)) {
    const invalid: InvalidParam[] = error.errors.map((e) => ({ name: e.path ?? '', reason: e.message ?? 'invalid' }));
    return problems.invalidInput(error.message ?? 'The request does not match the API contract.', invalid);
  }
  if (status === 404) return problems.notFound(error.message ?? 'Not found.');
  if (status === 405) return problems.methodNotAllowed(error.message ?? 'Method not allowed.');
  if (status === 413) return problems.payloadTooLarge(error.message ?? 'Payload too large.');
  if (status === 415) return problems.unsupportedMediaType(error.message ?? 'Unsupported media type.');
  if (typeof status === 'number' && status >= 400 && status < 500) {
    return new HttpProblem(status, 'client-error', 'Request error', error.message ?? 'The request could not be handled.');
  }
  return problems.internal();
}

/** The one four-argument error handler: every API error leaves as application/problem+json. */
export const problemErrorHandler: ErrorRequestHandler = (error, req, res, next) => {
  if (res.headersSent) {
    next(error);
    return;
  }
  const problem = toProblem(error);
  // 503 is a state the caller is told about (nothing published yet, identify busy), not a fault
  if (problem.status === 503) req.log?.warn({ problem: problem.slug }, problem.detail);
  else if (problem.status >= 500) req.log?.error({ err: error }, 'unhandled error');
  res.status(problem.status).type('application/problem+json').json(problem.toBody(req.originalUrl));
};

/** Unknown routes under /api answer 404 as a problem instead of falling through to the web app. */
export const apiNotFound: RequestHandler = (req) => {
  throw problems.notFound(`There is no API route ${req.method} ${req.path}.`);
};
