import { expect } from 'chai';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { PrincipalCache } from '../../api/src/gate/principal-cache';
import type { Principal } from '../../api/src/auth/principal';
import { UsageCounter } from '../../api/src/keys/usage-counter';
import { startTestApp } from './support/test-app';
import { createPartnerKey, signUpAndSignIn } from './support/accounts';

const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });
const someKey: Principal = { kind: 'key', keyId: 1, ownerId: 1, scopes: ['lookup'] };
const far = new Date(8.64e15);

describe('api: cached principals and batched key usage', () => {
  describe('the principal cache', () => {
    it('keeps a found principal until it expires, and never past its own validity', async () => {
      const cache = new PrincipalCache(50);
      let lookups = 0;
      const find = () => {
        lookups++;
        return Promise.resolve({ principal: someKey, validUntil: far });
      };
      expect(await cache.resolve('h', find)).to.deep.equal(someKey);
      expect(await cache.resolve('h', find)).to.deep.equal(someKey);
      expect(lookups).to.equal(1);
      await new Promise((resolve) => setTimeout(resolve, 60));
      await cache.resolve('h', find);
      expect(lookups).to.equal(2);

      const expiring = new PrincipalCache(60_000);
      await expiring.resolve('s', () => Promise.resolve({ principal: someKey, validUntil: new Date(Date.now() - 1) }));
      expect(expiring.get('s')).to.equal(undefined);
    });

    it('does not keep unknown tokens, nor a lookup that raced an invalidation', async () => {
      const cache = new PrincipalCache(60_000);
      expect(await cache.resolve('unknown', () => Promise.resolve(undefined))).to.equal(undefined);
      expect(cache.get('unknown')).to.equal(undefined);
      const raced = await cache.resolve('h', () => {
        cache.clear();
        return Promise.resolve({ principal: someKey, validUntil: far });
      });
      expect(raced).to.deep.equal(someKey);
      expect(cache.get('h')).to.equal(undefined);
    });
  });

  describe('in the app', () => {
    let created: CreatedApp;
    beforeEach(async () => {
      created = await startTestApp();
    });
    afterEach(async () => {
      await created.close();
    });

    it('serves a cached key without the database: a change written behind the models is not seen yet', async () => {
      const owner = await signUpAndSignIn(created, 'learner');
      const { key, id } = await createPartnerKey(created, owner.token, ['lookup']);
      await request(created.app).get('/api/v1/traits').set(bearer(key)).expect(200);
      // as another API process would: straight to the table, past this process's hooks
      await created.context.sequelize.query('UPDATE partner_keys SET revoked_at = :now WHERE id = :id', {
        replacements: { now: new Date().toISOString(), id },
      });
      await request(created.app).get('/api/v1/traits').set(bearer(key)).expect(200);
    });

    it('refuses a revoked key on the very next request', async () => {
      const owner = await signUpAndSignIn(created, 'learner');
      const { key, id } = await createPartnerKey(created, owner.token, ['lookup']);
      await request(created.app).get('/api/v1/traits').set(bearer(key)).expect(200);
      await request(created.app).delete(`/api/v1/keys/${id}`).set(bearer(owner.token)).expect(204);
      await request(created.app).get('/api/v1/traits').set(bearer(key)).expect(401);
    });

    it('refuses a signed-out session, and a deactivated owner’s key, on the very next request', async () => {
      const user = await signUpAndSignIn(created, 'learner');
      const admin = await signUpAndSignIn(created, 'admin');
      const { key } = await createPartnerKey(created, user.token, ['lookup']);
      await request(created.app).get('/api/v1/me').set(bearer(user.token)).expect(200);
      await request(created.app).get('/api/v1/traits').set(bearer(key)).expect(200);
      await request(created.app).delete('/api/v1/sessions/current').set(bearer(user.token)).expect(204);
      await request(created.app).get('/api/v1/me').set(bearer(user.token)).expect(401);

      const again = await request(created.app).post('/api/v1/sessions').send({ email: user.email, password: user.password }).expect(201);
      const token = (again.body as { token: string }).token;
      await request(created.app).get('/api/v1/me').set(bearer(token)).expect(200);
      await request(created.app).patch(`/api/v1/admin/users/${user.userId}`).set(bearer(admin.token)).send({ active: false }).expect(200);
      await request(created.app).get('/api/v1/me').set(bearer(token)).expect(401);
      await request(created.app).get('/api/v1/traits').set(bearer(key)).expect(401);
    });

    it('applies a role change on the very next request', async () => {
      const user = await signUpAndSignIn(created, 'learner');
      const admin = await signUpAndSignIn(created, 'admin');
      await request(created.app).get('/api/v1/admin/users').set(bearer(user.token)).expect(403);
      await request(created.app).patch(`/api/v1/admin/users/${user.userId}`).set(bearer(admin.token)).send({ role: 'admin' }).expect(200);
      await request(created.app).get('/api/v1/admin/users').set(bearer(user.token)).expect(200);
      await request(created.app).patch(`/api/v1/admin/users/${user.userId}`).set(bearer(admin.token)).send({ role: 'learner' }).expect(200);
      await request(created.app).get('/api/v1/admin/users').set(bearer(user.token)).expect(403);
    });

    it('writes nothing per request: counts reach the table in one flush, added to what is there', async () => {
      const owner = await signUpAndSignIn(created, 'learner');
      const { id } = await createPartnerKey(created, owner.token, ['lookup']);
      const counter = new UsageCounter(created.context.models, undefined, 60_000);
      const countInTable = async () => {
        const [rows] = await created.context.sequelize.query('SELECT count FROM key_usage WHERE key_id = :id', { replacements: { id } });
        return (rows as Array<{ count: number }>)[0]?.count;
      };
      for (let i = 0; i < 3; i++) counter.record(id);
      expect(await countInTable()).to.equal(undefined);
      await counter.flush();
      expect(await countInTable()).to.equal(3);
      counter.record(id);
      await counter.close();
      expect(await countInTable()).to.equal(4);
    });

    it('drops the counts of a key deleted since, so they do not hold back the others', async () => {
      const owner = await signUpAndSignIn(created, 'learner');
      const { id } = await createPartnerKey(created, owner.token, ['lookup']);
      const counter = new UsageCounter(created.context.models, undefined, 60_000);
      counter.record(id);
      counter.record(id + 1000);
      await counter.flush(); // fails on the missing key; the live key's count is kept
      await counter.flush();
      const [rows] = await created.context.sequelize.query('SELECT key_id AS "keyId", count FROM key_usage ORDER BY key_id');
      expect(rows).to.deep.equal([{ keyId: id, count: 1 }]);
      await counter.close();
    });

    it('counts usage in memory and lists it complete, last use included', async () => {
      const owner = await signUpAndSignIn(created, 'learner');
      const { key, id } = await createPartnerKey(created, owner.token, ['lookup']);
      await Promise.all(Array.from({ length: 7 }, () => request(created.app).get('/api/v1/traits').set(bearer(key)).expect(200)));
      const list = await request(created.app).get('/api/v1/keys').set(bearer(owner.token)).expect(200);
      const listed = (list.body as { keys: Array<{ id: number; lastUsedAt: string | null; usage: { today: number } }> }).keys.find((k) => k.id === id);
      expect(listed?.usage.today).to.equal(7);
      expect(listed?.lastUsedAt).to.be.a('string');
    });
  });

  it('writes the counts left on close, so a graceful shutdown loses none', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'sylvasift-usage-'));
    const env = { DATABASE_URL: `sqlite:${path.join(dir, 'usage.db')}` };
    try {
      const first = await startTestApp(env);
      const owner = await signUpAndSignIn(first, 'learner');
      const { key, id } = await createPartnerKey(first, owner.token, ['lookup']);
      for (let i = 0; i < 4; i++) await request(first.app).get('/api/v1/traits').set(bearer(key)).expect(200);
      await first.close();

      const second = await startTestApp(env);
      try {
        const [rows] = await second.context.sequelize.query('SELECT count FROM key_usage WHERE key_id = :id', { replacements: { id } });
        expect(rows).to.deep.equal([{ count: 4 }]);
      } finally {
        await second.close();
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
