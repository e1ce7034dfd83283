import type { Request, RequestHandler } from 'express';
import type { OpenAPIV3_1 } from 'openapi-types';
import { forbidden, unauthorized } from './challenge';
import type { Role, Scope } from './principal';

/** What openapi.yaml says of who may call an operation, beside `security`. */
interface AccessExtensions {
  security?: OpenAPIV3_1.SecurityRequirementObject[];
  /** signed-in users with one of these roles (admin passes every role); `[]`: any signed-in user, no partner keys */
  'x-roles'?: Role[];
  /** a partner key with this scope, or any signed-in user */
  'x-key-scope'?: Scope;
}

function operationOf(req: Request): AccessExtensions | undefined {
  return (req as Request & { openapi?: { schema?: AccessExtensions } }).openapi?.schema;
}

/**
 * Who may call comes before what they sent: a caller who may not use an operation hears 401 or 403,
 * never a detailed 400 about a body they should not be sending. The route's own guard still runs.
 */
export function accessBeforeValidation(document: OpenAPIV3_1.Document): RequestHandler {
  return (req, res, next) => {
    const operation = operationOf(req);
    if (!operation) return next();
    const security = operation.security ?? document.security ?? [];
    const anonymousAllowed = security.length === 0 || security.some((requirement) => Object.keys(requirement).length === 0);
    const principal = req.principal;
    const roles = operation['x-roles'];
    const scope = operation['x-key-scope'];
    if (!principal) return anonymousAllowed ? next() : next(unauthorized(res, 'Sign in or send a partner key to do this: `Authorization: Bearer <token>`.'));
    if (principal.kind === 'key') {
      if (roles) return next(forbidden(res, 'A partner key cannot do this; sign in as a user.'));
      if (scope && !principal.scopes.includes(scope)) return next(forbidden(res, `This partner key lacks the ${scope} scope.`, scope));
      return next();
    }
    if (roles && roles.length > 0 && principal.role !== 'admin' && !roles.includes(principal.role)) {
      return next(forbidden(res, `This needs the ${roles.join(' or ')} role.`));
    }
    next();
  };
}
