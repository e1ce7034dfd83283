import type { RequestHandler } from 'express';
import { forbidden, unauthorized } from './challenge';
import type { Principal, Role, Scope } from './principal';

type UserPrincipal = Extract<Principal, { kind: 'user' }>;
type KeyPrincipal = Extract<Principal, { kind: 'key' }>;

/** A signed-in user; with roles given, one of them (admin passes every role check). */
export function requireUser(...roles: Role[]): RequestHandler {
  return (req, res, next) => {
    const principal = req.principal;
    if (!principal) throw unauthorized(res, 'Sign in to do this.');
    if (principal.kind !== 'user') throw forbidden(res, 'A partner key cannot do this; sign in as a user.');
    if (roles.length > 0 && principal.role !== 'admin' && !roles.includes(principal.role)) {
      throw forbidden(res, `This needs the ${roles.join(' or ')} role.`);
    }
    next();
  };
}

/** A partner key that carries the scope, or any signed-in user. */
export function requireScopeOrUser(scope: Scope): RequestHandler {
  return (req, res, next) => {
    const principal = req.principal;
    if (!principal) throw unauthorized(res, `Send a partner key with the ${scope} scope, or sign in.`);
    if (principal.kind === 'key' && !principal.scopes.includes(scope)) {
      throw forbidden(res, `This partner key lacks the ${scope} scope.`, scope);
    }
    next();
  };
}

/** A partner key, whatever its scopes (a key reading itself); signed-in users are told to use a key. */
export function requireKey(): RequestHandler {
  return (req, res, next) => {
    const principal = req.principal;
    if (!principal) throw unauthorized(res, 'Send the partner key: `Authorization: Bearer svk_…`.');
    if (principal.kind !== 'key') throw forbidden(res, 'Only a partner key can read itself here; signed-in users see their keys at /api/v1/keys.');
    next();
  };
}

/** The partner key behind a request that passed requireKey; for routes, never below them. */
export function currentKey(principal: Principal | undefined): KeyPrincipal {
  if (!principal || principal.kind !== 'key') throw new Error('currentKey() used on a route without requireKey()');
  return principal;
}

/** The signed-in user behind a request that passed requireUser; for routes, never below them. */
export function currentUser(principal: Principal | undefined): UserPrincipal {
  if (!principal || principal.kind !== 'user') throw new Error('currentUser() used on a route without requireUser()');
  return principal;
}
