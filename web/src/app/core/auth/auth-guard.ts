import { inject } from '@angular/core';
import { type CanActivateFn, Router } from '@angular/router';
import { AuthService } from './auth-service';

/**
 * Sends visitors without a session to sign-in, remembering where they were going. A convenience
 * only: the server checks the session on every request.
 */
export const authGuard: CanActivateFn = (_route, state) => {
  if (inject(AuthService).signedIn()) return true;
  return inject(Router).createUrlTree(['/sign-in'], { queryParams: { next: state.url } });
};
