import { inject } from '@angular/core';
import { type CanActivateFn, Router } from '@angular/router';
import { catchError, map, of } from 'rxjs';
import { AuthService } from '../../core/auth/auth-service';

/** The roles the Matrix desk is for; the server checks every request itself. */
export const DESK_ROLES: readonly string[] = ['curator', 'admin'];

/**
 * Lets curators and admins into the Matrix desk; visitors without a session go to sign-in, and
 * anyone else goes home. A convenience only: the server refuses every desk call to other roles.
 */
export const deskGuard: CanActivateFn = (_route, state) => {
  const auth = inject(AuthService);
  const router = inject(Router);
  const signIn = router.createUrlTree(['/sign-in'], { queryParams: { next: state.url } });
  if (!auth.signedIn()) return signIn;
  const decide = (role: string | undefined) => (role !== undefined && DESK_ROLES.includes(role) ? true : router.createUrlTree(['/'], { queryParams: { from: 'desk' } }));
  const me = auth.me();
  if (me) return decide(me.role);
  return auth.refreshMe().pipe(
    map((account) => decide(account.role)),
    catchError(() => of(auth.signedIn() ? router.createUrlTree(['/']) : signIn)),
  );
};
