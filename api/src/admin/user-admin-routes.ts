import { Router } from 'express';
import { currentUser, requireUser } from '../auth/guards';
import { isRole, type Role } from '../auth/principal';
import { problems } from '../http/problem';
import { accountView } from '../accounts/account-views';
import { idParam } from '../http/request-fields';
import type { UserAdminService } from './user-admin-service';

function changesFrom(body: unknown): { role?: Role; active?: boolean } {
  const fields = typeof body === 'object' && body !== null ? (body as Record<string, unknown>) : {};
  const changes: { role?: Role; active?: boolean } = {};
  if (fields['role'] !== undefined) {
    if (!isRole(fields['role'])) throw problems.invalidInput('Unknown role.', [{ name: '/role', reason: 'not a role' }]);
    changes.role = fields['role'];
  }
  if (fields['active'] !== undefined) {
    if (typeof fields['active'] !== 'boolean') throw problems.invalidInput('active must be true or false.', [{ name: '/active', reason: 'not a boolean' }]);
    changes.active = fields['active'];
  }
  if (changes.role === undefined && changes.active === undefined) {
    throw problems.invalidInput('Send a role, active, or both.', [{ name: '/', reason: 'nothing to change' }]);
  }
  return changes;
}

/** Users for admins (mounted at /api/v1/admin/users). */
export function userAdminRoutes(users: UserAdminService): Router {
  const router = Router();
  router.use(requireUser('admin'), (_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });

  router.get('/', async (req, res) => {
    const role = req.query['role'];
    const active = req.query['active'];
    if (role !== undefined && !isRole(role)) throw problems.invalidInput('Unknown role.', [{ name: 'query.role', reason: 'not a role' }]);
    const list = await users.list({ role, active: active === undefined ? undefined : active === 'true' });
    res.json({ users: list.map(accountView) });
  });

  router.patch('/:id', async (req, res) => {
    const updated = await users.change(currentUser(req.principal).userId, idParam(req.params['id']), changesFrom(req.body));
    res.json(accountView(updated));
  });

  return router;
}
