/**
 * Every kind of problem the API answers, by the name its `type` URL ends in. Each has a page at
 * `/api/problems/<name>` (problem-pages.ts) and is listed in openapi.yaml.
 * Invariant: a problem can only be built with a name listed here (HttpProblem's slug is typed by it).
 */
export const PROBLEM_TYPES = {
  'invalid-input': {
    status: 400,
    title: 'Invalid input',
    about:
      'The request does not match the API contract or names something that does not exist. `invalid-params` lists every offending field as a JSON pointer (`/body/observations/0/trait`, `/query/limit`) with the reason; an unknown taxon id comes with the taxa it most likely meant.',
  },
  'malformed-json': {
    status: 400,
    title: 'Malformed JSON',
    about: 'The request body is not valid JSON. Check quoting and commas; send it with `Content-Type: application/json`.',
  },
  'link-not-valid': {
    status: 400,
    title: 'Link not valid',
    about: 'A password-reset or invitation link is unknown, has been used already, or has expired. Ask for a new one.',
  },
  'client-error': { status: 400, title: 'Request error', about: 'The request could not be handled as sent; `detail` says why.' },
  unauthorized: {
    status: 401,
    title: 'Authentication required',
    about:
      'The operation needs credentials, or the ones sent are not good. Send `Authorization: Bearer <token>` with a session token (from `POST /api/v1/sessions`) or a partner key; a token that is unknown, expired or revoked is refused.',
  },
  forbidden: {
    status: 403,
    title: 'Forbidden',
    about: 'The caller is known but may not do this: the operation needs another role, or a partner key lacks the scope (named in `WWW-Authenticate`).',
  },
  'not-found': {
    status: 404,
    title: 'Not found',
    about: 'No such resource, or one the caller may not see. For an unknown taxon id, `suggestions` lists the taxa it most likely meant.',
  },
  'method-not-allowed': {
    status: 405,
    title: 'Method not allowed',
    about: 'The path exists but does not answer this method; the `Allow` header lists the methods it does answer.',
  },
  conflict: {
    status: 409,
    title: 'Conflict',
    about:
      'The resource changed since it was read (a stale `version`: `current` holds it as it is now), the name is taken, or the state does not allow the step (`state`). Read it again and retry.',
  },
  'payload-too-large': {
    status: 413,
    title: 'Payload too large',
    about: 'The body or the uploaded file is larger than the endpoint accepts; `detail` states the limit.',
  },
  'unsupported-media-type': {
    status: 415,
    title: 'Unsupported media type',
    about:
      'The body has no Content-Type, or one the endpoint does not take; `detail` names the types it takes. A photo whose content is not an image is refused the same way.',
  },
  'invalid-cells': {
    status: 409,
    title: 'Some cells break the cell rules',
    about:
      'The draft is not published while any cell breaks a cell rule (a range not reading min ≤ low ≤ high ≤ max, a value the trait does not have…); `cells` names each with its problems. Fix them on the Matrix desk and publish again.',
  },
  'matrix-invalid': {
    status: 422,
    title: 'The matrix would have errors',
    about: 'The change or the edition would leave the matrix with errors; `errors` lists each with its path, and nothing was written.',
  },
  'import-invalid': {
    status: 422,
    title: 'The sheet has problems',
    about:
      'An import in `apply` mode found problems in the sheet; `problems` lists each with its row and column, and nothing was imported. Run a dry run to see them before applying.',
  },
  'idempotency-key-reused': {
    status: 422,
    title: 'Idempotency-Key used for another request',
    about:
      'This `Idempotency-Key` was sent before by the same caller with another request (method, path, query or body). A key stands for one request for 24 hours: send a new key for a new request.',
  },
  'not-a-sylvasift-backup': {
    status: 422,
    title: 'Not a Sylvasift backup',
    about: 'The file to restore is not a SQLite database made by this version (same tables, columns and migrations). Nothing was changed.',
  },
  'too-many-requests': {
    status: 429,
    title: 'Too many requests',
    about:
      'A rate limit or quota is used up. Wait for the seconds in `Retry-After`; `RateLimit` and `RateLimit-Policy` say how much is left and how the limit is set.',
  },
  'sign-in-locked': {
    status: 429,
    title: 'Too many failed sign-ins',
    about: 'Too many failed sign-ins for this e-mail address: it is locked for a while. Wait for the seconds in `Retry-After`, or reset the password.',
  },
  internal: { status: 500, title: 'Internal server error', about: 'Something went wrong on the server. It has been logged; try again later.' },
  'not-implemented': { status: 501, title: 'Not implemented', about: 'This deployment cannot do this, for example backups on a database other than SQLite.' },
  'service-unavailable': {
    status: 503,
    title: 'Service unavailable',
    about: 'No edition of the matrix has been published yet, so there is nothing to look up or sift.',
  },
  busy: { status: 503, title: 'Busy', about: 'Every identify worker is busy and the queue is full. Wait for the seconds in `Retry-After` and send it again.' },
} as const satisfies Record<string, { status: number; title: string; about: string }>;

export type ProblemType = keyof typeof PROBLEM_TYPES;

export function isProblemType(name: string): name is ProblemType {
  return Object.hasOwn(PROBLEM_TYPES, name);
}
