/**
 * The one shape the app shows for a failed request: a problem+json body from the API, or a
 * network failure, normalised into a sentence a person can read.
 */
export interface InvalidParam {
  name: string;
  reason: string;
}

export class ApiProblem extends Error {
  constructor(
    readonly status: number,
    readonly title: string,
    readonly detail: string,
    readonly invalidParams: readonly InvalidParam[] = [],
    readonly type = 'about:blank',
    /** the body's other members (RFC 9457 extension members), e.g. a 409's `current` */
    readonly extensions: Readonly<Record<string, unknown>> = {},
  ) {
    super(detail || title);
    this.name = 'ApiProblem';
  }

  /** No answer from the server: the device is offline or the server cannot be reached. */
  get offline(): boolean {
    return this.status === 0;
  }

  /** The sentence to show: the server's detail, followed by what was wrong with each field. */
  get readable(): string {
    const fields = this.invalidParams.map((param) => `${fieldName(param.name)}: ${param.reason}`);
    return [this.detail || this.title, ...fields].join(' ');
  }

  /** The reason given for one field (matched on the last segment of its JSON pointer), if any. */
  reasonFor(field: string): string | undefined {
    return this.invalidParams.find((param) => fieldName(param.name) === field)?.reason;
  }
}

function fieldName(pointer: string): string {
  const parts = pointer.split(/[/.]/).filter((part) => part !== '');
  return parts.at(-1) ?? pointer;
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function readInvalidParams(value: unknown): InvalidParam[] {
  if (!Array.isArray(value)) return [];
  return value.filter(isRecord).map((param) => ({ name: String(param['name'] ?? ''), reason: String(param['reason'] ?? '') }));
}

const STANDARD_MEMBERS = new Set(['type', 'title', 'status', 'detail', 'instance', 'invalid-params']);

function isProblemBody(body: unknown): body is Record<string, unknown> & { title: string } {
  return isRecord(body) && typeof body['title'] === 'string';
}

function deviceOffline(): boolean {
  return typeof navigator !== 'undefined' && navigator.onLine === false;
}

/** The problem for a request that got no answer from the server. */
export function offlineProblem(): ApiProblem {
  return deviceOffline()
    ? new ApiProblem(0, 'You are offline', 'You are offline. This needs a connection to the server; try again once you are back online.')
    : new ApiProblem(0, 'No connection', 'The server cannot be reached. This needs a connection to the server; check the connection and try again.');
}

/**
 * Builds an ApiProblem from an HTTP status and whatever body came back. A network failure (status 0)
 * and the service worker's own answer when its fetch failed (504 with no problem body) both mean the
 * server was not reached, and read as such.
 */
export function problemFromResponse(status: number, body: unknown): ApiProblem {
  const problemBody = isProblemBody(body);
  if (status === 0 || (status === 504 && !problemBody) || (status >= 500 && !problemBody && deviceOffline())) return offlineProblem();
  if (isProblemBody(body)) {
    const extensions = Object.fromEntries(Object.entries(body).filter(([name]) => !STANDARD_MEMBERS.has(name)));
    return new ApiProblem(
      typeof body['status'] === 'number' ? body['status'] : status,
      body['title'],
      typeof body['detail'] === 'string' ? body['detail'] : '',
      readInvalidParams(body['invalid-params']),
      typeof body['type'] === 'string' ? body['type'] : 'about:blank',
      extensions,
    );
  }
  if (status >= 500) return new ApiProblem(status, 'Server error', 'The server ran into a problem. Try again in a moment.');
  return new ApiProblem(status, 'Request failed', `The request failed (HTTP ${status}).`);
}

/** A readable message for any error a request or the engine may throw. */
export function readableError(error: unknown): string {
  if (error instanceof ApiProblem) return error.readable;
  if (error instanceof Error) return error.message;
  return 'Something went wrong.';
}
