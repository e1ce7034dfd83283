/** Who is calling: a signed-in user, a partner key, or (when `req.principal` is unset) anonymous. */
export type Role = 'learner' | 'coach' | 'curator' | 'reviewer' | 'admin';
export type Scope = 'lookup' | 'identify';

export const ROLES: readonly Role[] = ['learner', 'coach', 'curator', 'reviewer', 'admin'];
export const SCOPES: readonly Scope[] = ['lookup', 'identify'];

export type Principal =
  { kind: 'user'; userId: number; email: string; displayName: string; role: Role } | { kind: 'key'; keyId: number; ownerId: number; scopes: Scope[] };

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}

export function isScope(value: unknown): value is Scope {
  return typeof value === 'string' && (SCOPES as readonly string[]).includes(value);
}

declare module 'express-serve-static-core' {
  interface Request {
    /** set by the authenticate middleware; undefined for anonymous callers */
    principal?: Principal;
  }
}
