import { Router } from 'express';
import { FIELD_LIMITS } from '@shared/engine';
import { currentKey, currentUser, requireKey, requireUser } from '../auth/guards';
import { isScope, type Scope } from '../auth/principal';
import { problems } from '../http/problem';
import { idParam, stringField } from '../http/request-fields';
import type { KeyService, KeyWithUsage } from './key-service';
import type { PartnerKey } from './key-store';
import type { QuotaLeft } from './quota';
import { allowedOriginsField } from './key-origins';

const keyView = (key: PartnerKey) => ({
  id: key.id,
  ownerId: key.ownerId,
  name: key.name,
  prefix: key.prefix,
  scopes: key.scopes,
  allowedOrigins: key.allowedOrigins,
  createdAt: key.createdAt.toISOString(),
  lastUsedAt: key.lastUsedAt ? key.lastUsedAt.toISOString() : null,
  revokedAt: key.revokedAt ? key.revokedAt.toISOString() : null,
});

const quotaView = (quota: QuotaLeft) => ({ limit: quota.limit, remaining: quota.remaining, resetsAt: quota.resetsAt ? quota.resetsAt.toISOString() : null });

const keyWithUsageView = (key: KeyWithUsage) => ({ ...keyView(key), usage: key.usage });

const fieldOf = (body: unknown, name: string): unknown => (typeof body === 'object' && body !== null ? (body as Record<string, unknown>)[name] : undefined);

function scopesField(body: unknown): Scope[] {
  const value = typeof body === 'object' && body !== null ? (body as Record<string, unknown>)['scopes'] : undefined;
  if (!Array.isArray(value) || !value.every(isScope)) {
    throw problems.invalidInput('scopes must be a list of lookup and identify.', [{ name: '/scopes', reason: 'unknown scope' }]);
  }
  return value;
}

/** A signed-in user's partner keys (mounted at /api/v1/keys); `quotaLeft` reads the daily limiter. */
export function keyRoutes(keys: KeyService, quotaLeft: (keyId: number) => Promise<QuotaLeft>): Router {
  const router = Router();
  // the calling key itself, before the user guard below (and before /:id, which would read "current" as an id)
  router.get('/current', requireKey(), async (req, res) => {
    res.set('Cache-Control', 'no-store');
    const key = await keys.current(currentKey(req.principal).keyId);
    res.json({ ...keyWithUsageView(key), quota: quotaView(await quotaLeft(key.id)) });
  });

  router.use(requireUser(), (_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });

  router.post('/', async (req, res) => {
    const { key, record } = await keys.create(currentUser(req.principal).userId, {
      name: stringField(req.body, 'name', { max: FIELD_LIMITS.keyName.max }),
      scopes: scopesField(req.body),
      allowedOrigins: fieldOf(req.body, 'allowedOrigins') === undefined ? [] : allowedOriginsField(fieldOf(req.body, 'allowedOrigins')),
    });
    res
      .status(201)
      .location(`/api/v1/keys/${record.id}`)
      .json({ ...keyView(record), key });
  });

  router.get('/', async (req, res) => {
    const list = await keys.listOwn(currentUser(req.principal).userId);
    res.json({ keys: list.map(keyWithUsageView) });
  });

  router.get('/:id', async (req, res) => {
    res.json(keyWithUsageView(await keys.get(currentUser(req.principal), idParam(req.params['id']))));
  });

  router.get('/:id/usage', async (req, res) => {
    const { key, days, total } = await keys.usageOf(currentUser(req.principal).userId, idParam(req.params['id']));
    const quota = await quotaLeft(key.id);
    res.json({ keyId: key.id, days, total, quota: quotaView(quota) });
  });

  router.patch('/:id', async (req, res) => {
    const origins = fieldOf(req.body, 'allowedOrigins');
    const change = {
      name: fieldOf(req.body, 'name') === undefined ? undefined : stringField(req.body, 'name', { max: FIELD_LIMITS.keyName.max }),
      allowedOrigins: origins === undefined ? undefined : allowedOriginsField(origins),
    };
    res.json(keyWithUsageView(await keys.update(currentUser(req.principal), idParam(req.params['id']), change)));
  });

  router.delete('/:id', async (req, res) => {
    await keys.revoke(currentUser(req.principal), idParam(req.params['id']));
    res.status(204).end();
  });

  return router;
}

/** Every partner key, for admins (mounted at /api/v1/admin/keys). */
export function adminKeyRoutes(keys: KeyService): Router {
  const router = Router();
  router.use(requireUser('admin'), (_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  router.get('/', async (_req, res) => {
    res.json({ keys: (await keys.listAll()).map(keyWithUsageView) });
  });
  router.delete('/:id', async (req, res) => {
    await keys.revoke(currentUser(req.principal), idParam(req.params['id']));
    res.status(204).end();
  });
  return router;
}
