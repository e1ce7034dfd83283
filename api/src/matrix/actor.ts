import { currentUser } from '../auth/guards';
import type { Principal } from '../auth/principal';
import type { Actor } from './audit-store';

/** The signed-in curator behind a request, as the audit log names them. */
export function actorOf(principal: Principal | undefined): Actor {
  const user = currentUser(principal);
  return { userId: user.userId, email: user.email };
}
