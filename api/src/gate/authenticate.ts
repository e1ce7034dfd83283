import type { RequestHandler } from 'express';
import passport from 'passport';
import { Strategy as BearerStrategy } from 'passport-http-bearer';
import type { AccountModels } from '../accounts/account-models';
import type { KeyModels } from '../keys/key-models';
import { unauthorized } from '../auth/challenge';
import type { Principal } from '../auth/principal';
import type { PrincipalCache } from './principal-cache';
import { findKeyPrincipal, findSessionPrincipal } from './principal-store';
import { hashToken, KEY_PREFIX, SESSION_PREFIX } from '../auth/tokens';

async function principalFor(models: AccountModels & KeyModels, principals: PrincipalCache, token: string): Promise<Principal | undefined> {
  if (token.startsWith(SESSION_PREFIX)) {
    const tokenHash = hashToken(token);
    return principals.resolve(tokenHash, () => findSessionPrincipal(models, tokenHash, new Date()));
  }
  if (token.startsWith(KEY_PREFIX)) {
    const keyHash = hashToken(token);
    return principals.resolve(keyHash, () => findKeyPrincipal(models, keyHash));
  }
  return undefined;
}

function isPrincipal(value: unknown): value is Principal {
  return typeof value === 'object' && value !== null && 'kind' in value;
}

/**
 * Reads `Authorization: Bearer <token>` (a session token or a partner key) and sets req.principal.
 * No header means anonymous; a header that does not name a live token is a 401. Principals found
 * are kept in `principals` for a few seconds (see PrincipalCache for how writes invalidate them).
 */
export function authenticate(models: AccountModels & KeyModels, principals: PrincipalCache): RequestHandler {
  // One authenticator per app, so test apps with their own databases never share a strategy.
  const authenticator = new passport.Passport();
  authenticator.use(
    new BearerStrategy((token, done) => {
      principalFor(models, principals, token).then(
        (principal) => done(null, principal ?? false),
        (error: unknown) => done(error),
      );
    }),
  );

  return (req, res, next) => {
    const header = req.headers.authorization;
    if (header === undefined) {
      next();
      return;
    }
    const scheme = /^(\S+)\s+\S/.exec(header)?.[1];
    if (scheme === undefined || scheme.toLowerCase() !== 'bearer') {
      const sent = scheme === undefined ? 'The Authorization header has no scheme' : `The Authorization scheme "${scheme}" is not one this API takes`;
      next(unauthorized(res, `${sent}: send \`Authorization: Bearer <token>\` with a session token or a partner key.`));
      return;
    }
    const handler = authenticator.authenticate('bearer', { session: false }, (error: unknown, user: unknown) => {
      if (error) {
        next(error);
        return;
      }
      if (!isPrincipal(user)) {
        next(unauthorized(res, 'The bearer token is unknown, expired or revoked.', true));
        return;
      }
      req.principal = user;
      next();
    }) as RequestHandler;
    handler(req, res, next);
  };
}
