import { inject } from '@angular/core';
import { type CanActivateFn, Router } from '@angular/router';
import { catchError, map, of } from 'rxjs';
import { AuthService } from './auth-service';

/**
 * Lets through signed-in users with one of `roles`; visitors go to sign-in (remembering where they
 * were going), others to the home page. It waits for the account when the session was only just
 * restored. A convenience only: the server checks the role on every request.
 */
export function roleGuard(roles: readonly string[]): CanActivateFn {
  return (_route, state) => {
    const auth = inject(AuthService);
    const router = inject(Router);
    const signIn = router.createUrlTree(['/sign-in'], { queryParams: { next: state.url } });
    if (!auth.signedIn()) return signIn;
    const decide = (role: string) => (roles.includes(role) ? true : router.createUrlTree(['/']));
    const me = auth.me();
    if (me) return decide(me.role);
    return auth.refreshMe().pipe(
      map((account) => decide(account.role)),
      // a 401 ended the session; offline or a server error: no way to tell, so not in
      catchError(() => of(auth.signedIn() ? router.createUrlTree(['/']) : signIn)),
    );
  };
}
