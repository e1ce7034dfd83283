/**
 * RFC 9457 problem details. Every error the API returns is one of these, served as
 * `application/problem+json` with a stable `type` per kind of problem.
 */
import type { ProblemType } from './problem-types';

/** Problem types are pages on this server that explain them (problem-pages.ts), resolved against the answer's own URL. */
export const PROBLEM_BASE = '/api/problems/';

export interface InvalidParam {
  /** where the bad input is: a JSON pointer into the request (`/body/observations/2/trait`, `/query/limit`) */
  name: string;
  reason: string;
  /** for an unknown id: what it most likely meant, best first */
  suggestions?: Array<{ id: string; scientificName: string; commonNames: string[] }>;
}

export interface ProblemBody {
  type: string;
  title: string;
  status: number;
  detail: string;
  instance?: string;
  'invalid-params'?: InvalidParam[];
  [extension: string]: unknown;
}

/** A domain error that maps straight to a problem response. */
export class HttpProblem extends Error {
  constructor(
    readonly status: number,
    readonly slug: ProblemType,
    readonly title: string,
    readonly detail: string,
    readonly extensions: Record<string, unknown> = {},
  ) {
    super(detail);
    this.name = 'HttpProblem';
  }

  toBody(instance?: string): ProblemBody {
    return { type: PROBLEM_BASE + this.slug, title: this.title, status: this.status, detail: this.detail, instance, ...this.extensions };
  }
}

export const problems = {
  notFound: (detail: string, extensions: Record<string, unknown> = {}) => new HttpProblem(404, 'not-found', 'Not found', detail, extensions),
  invalidInput: (detail: string, invalidParams: InvalidParam[]) =>
    new HttpProblem(400, 'invalid-input', 'Invalid input', detail, { 'invalid-params': invalidParams }),
  malformedJson: (detail: string) => new HttpProblem(400, 'malformed-json', 'Malformed JSON', detail),
  payloadTooLarge: (detail: string) => new HttpProblem(413, 'payload-too-large', 'Payload too large', detail),
  unsupportedMediaType: (detail: string) => new HttpProblem(415, 'unsupported-media-type', 'Unsupported media type', detail),
  methodNotAllowed: (detail: string) => new HttpProblem(405, 'method-not-allowed', 'Method not allowed', detail),
  unauthorized: (detail: string) => new HttpProblem(401, 'unauthorized', 'Authentication required', detail),
  forbidden: (detail: string) => new HttpProblem(403, 'forbidden', 'Forbidden', detail),
  conflict: (detail: string, extensions: Record<string, unknown> = {}) => new HttpProblem(409, 'conflict', 'Conflict', detail, extensions),
  tooManyRequests: (detail: string) => new HttpProblem(429, 'too-many-requests', 'Too many requests', detail),
  serviceUnavailable: (detail: string) => new HttpProblem(503, 'service-unavailable', 'Service unavailable', detail),
  internal: () => new HttpProblem(500, 'internal', 'Internal server error', 'Something went wrong on our side. It has been logged.'),
} as const;
