import type { RequestHandler } from 'express';
import { forbidden } from './challenge';
import type { Scope } from './principal';

/**
 * Published data is open to anonymous visitors and signed-in users; a partner key presenting
 * itself must carry the scope, so a key issued for one purpose cannot be used for another.
 */
export function openToAnonymousButKeysNeed(scope: Scope): RequestHandler {
  return (req, res, next) => {
    const principal = req.principal;
    if (principal?.kind === 'key' && !principal.scopes.includes(scope)) {
      throw forbidden(res, `This partner key lacks the ${scope} scope.`, scope);
    }
    next();
  };
}
