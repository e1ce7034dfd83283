import type { Response } from 'express';
import { problems, type HttpProblem } from '../http/problem';

const REALM = 'sylvasift';

/** 401 with the bearer challenge set on the response; `invalid` says a token was sent but is not (or no longer) good. */
export function unauthorized(res: Response, detail: string, invalid = false): HttpProblem {
  res.set(
    'WWW-Authenticate',
    invalid ? `Bearer realm="${REALM}", error="invalid_token", error_description="${detail.replace(/"/g, "'")}"` : `Bearer realm="${REALM}"`,
  );
  return problems.unauthorized(detail);
}

/** 403: the caller is known but may not do this; a missing key scope is named in the challenge too. */
export function forbidden(res: Response, detail: string, missingScope?: string): HttpProblem {
  if (missingScope) res.set('WWW-Authenticate', `Bearer realm="${REALM}", error="insufficient_scope", scope="${missingScope}"`);
  return problems.forbidden(detail);
}
