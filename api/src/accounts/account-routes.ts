import { Router, type ErrorRequestHandler, type RequestHandler } from 'express';
import { FIELD_LIMITS } from '@shared/engine';
import { currentUser, requireUser } from '../auth/guards';
import { isRole } from '../auth/principal';
import { problems } from '../http/problem';
import type { OneTimeLinkService } from './one-time-link-service';
import { SignInLocked, type SessionService } from './session-service';
import { accountView, sessionView } from './account-views';
import { stringField } from '../http/request-fields';

const bearerToken = (header: string | undefined) => (header ?? '').replace(/^Bearer\s+/i, '').trim();

const noStore: RequestHandler = (_req, res, next) => {
  res.set('Cache-Control', 'no-store');
  next();
};

/** A locked address answers 429 with Retry-After, like the per-IP limiter does. */
const retryAfterForLocks: ErrorRequestHandler = (error, _req, res, next) => {
  if (error instanceof SignInLocked) res.set('Retry-After', String(error.retryAfterSeconds));
  next(error);
};

/** Sign-up, sessions, the current account, password resets and invitations (mounted at /api/v1). */
export function accountRoutes(accounts: { sessions: SessionService; links: OneTimeLinkService }, signInLimiter: RequestHandler): Router {
  const { sessions, links } = accounts;
  const router = Router();
  router.use(noStore);

  router.post('/accounts', async (req, res) => {
    const account = await sessions.signUp({
      email: stringField(req.body, 'email'),
      password: stringField(req.body, 'password'),
      displayName: stringField(req.body, 'displayName', { max: FIELD_LIMITS.displayName.max }),
    });
    res.status(201).location('/api/v1/me').json(accountView(account));
  });

  router.post('/sessions', signInLimiter, async (req, res) => {
    const signedIn = await sessions.signIn({ email: stringField(req.body, 'email'), password: stringField(req.body, 'password') });
    res.status(201).json(sessionView(signedIn));
  });

  router.delete('/sessions/current', requireUser(), async (req, res) => {
    await sessions.signOut(bearerToken(req.headers.authorization));
    res.status(204).end();
  });

  router.get('/me', requireUser(), async (req, res) => {
    res.json(accountView(await sessions.me(currentUser(req.principal).userId)));
  });

  router.post('/password-resets', async (req, res) => {
    await links.requestPasswordReset(stringField(req.body, 'email'));
    res.status(202).json({ message: 'If an account has this address, a reset link is on its way.' });
  });

  router.post('/password-resets/:token', async (req, res) => {
    await links.resetPassword(String(req.params['token']), stringField(req.body, 'password'));
    res.status(204).end();
  });

  router.post('/invitations/:token', async (req, res) => {
    const signedIn = await links.acceptInvitation(String(req.params['token']), {
      displayName: stringField(req.body, 'displayName', { max: FIELD_LIMITS.displayName.max }),
      password: stringField(req.body, 'password'),
    });
    res.status(201).json(sessionView(signedIn));
  });

  router.post('/admin/invitations', requireUser('admin'), async (req, res) => {
    const role = stringField(req.body, 'role');
    if (!isRole(role)) throw problems.invalidInput('Unknown role.', [{ name: '/role', reason: 'not a role' }]);
    const admin = currentUser(req.principal);
    const invitation = await links.invite({ email: stringField(req.body, 'email'), role, invitedBy: admin });
    res.status(201).json({ email: invitation.email, role: invitation.role, expiresAt: invitation.expiresAt.toISOString() });
  });

  router.use(retryAfterForLocks);
  return router;
}
