import { expect } from 'chai';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { assertContractKept, startTestApp } from './support/test-app';
import { signUpAndSignIn, type SignedInUser } from './support/accounts';

/**
 * CORS for partner apps in browsers. The protocol is the WHATWG Fetch standard's (§3.2 "CORS
 * protocol": a preflight is an OPTIONS request with Origin and Access-Control-Request-Method; the
 * answer names the origin or `*`, the methods and headers, and Max-Age; credentials are never allowed here).
 */
describe('api: CORS for partner browser apps', () => {
  let created: CreatedApp;
  let developer: SignedInUser;
  let trailKey: string;
  let trailKeyId: number;
  let serverKey: string;
  const TRAIL = 'https://trail.example';
  const STRANGER = 'https://stranger.example';
  const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });
  const preflight = (path: string, origin: string, method = 'GET') =>
    request(created.app)
      .options(path)
      .set({ Origin: origin, 'Access-Control-Request-Method': method, 'Access-Control-Request-Headers': 'authorization, content-type, idempotency-key' });

  before(async () => {
    created = await startTestApp();
    developer = await signUpAndSignIn(created, 'learner');
    const trail = await request(created.app)
      .post('/api/v1/keys')
      .set(bearer(developer.token))
      .send({ name: 'Trail web app', scopes: ['lookup', 'identify'], allowedOrigins: [TRAIL] })
      .expect(201);
    expect(trail.body.allowedOrigins).to.deep.equal([TRAIL]);
    trailKey = trail.body.key as string;
    trailKeyId = trail.body.id as number;
    const server = await request(created.app)
      .post('/api/v1/keys')
      .set(bearer(developer.token))
      .send({ name: 'Server job', scopes: ['lookup', 'identify'] })
      .expect(201);
    expect(server.body.allowedOrigins).to.deep.equal([]);
    serverKey = server.body.key as string;
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  function expectNoCredentials(headers: Record<string, string>): void {
    expect(headers).to.not.have.property('access-control-allow-credentials');
  }

  describe('preflight', () => {
    it('for a keyed operation, answers an origin a live key lists: the origin echoed, methods, headers, Max-Age, Vary: Origin', async () => {
      const res = await preflight('/api/v1/identify', TRAIL, 'POST').expect(204);
      expect(res.headers['access-control-allow-origin']).to.equal(TRAIL);
      expect(res.headers['access-control-allow-methods']).to.include('POST');
      const allowed = (res.headers['access-control-allow-headers'] as string).toLowerCase().split(/,\s*/);
      expect(allowed).to.include.members(['authorization', 'content-type', 'idempotency-key']);
      expect(Number(res.headers['access-control-max-age'])).to.be.greaterThan(0);
      expect(res.headers['vary']).to.match(/\bOrigin\b/);
      expectNoCredentials(res.headers);
    });

    it('for a keyed operation, refuses an origin no key lists (403 problem, no Allow-Origin)', async () => {
      const res = await preflight('/api/v1/identify', STRANGER, 'POST').expect(403);
      expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
      expect(res.headers).to.not.have.property('access-control-allow-origin');
      expect(res.body.detail).to.include(STRANGER);
    });

    it('for an operation open to anonymous callers, answers any origin with *', async () => {
      const res = await preflight('/api/v1/taxa/pinus-taeda', STRANGER).expect(204);
      expect(res.headers['access-control-allow-origin']).to.equal('*');
      expect(res.headers['access-control-allow-methods']).to.include('GET');
      expectNoCredentials(res.headers);
    });

    it('answers 404 for a path or method the API does not have', async () => {
      await preflight('/api/v1/no-such-thing', TRAIL).expect(404);
      await preflight('/api/v1/taxa/pinus-taeda', TRAIL, 'DELETE').expect(404);
    });

    it('follows the key: once revoked, or once the origin is taken off its list, the origin is refused', async () => {
      const other = await request(created.app)
        .post('/api/v1/keys')
        .set(bearer(developer.token))
        .send({ name: 'Short-lived', scopes: ['lookup'], allowedOrigins: ['http://localhost:4300'] })
        .expect(201);
      await preflight('/api/v1/keys/current', 'http://localhost:4300').expect(204);
      await request(created.app).patch(`/api/v1/keys/${other.body.id}`).set(bearer(developer.token)).send({ allowedOrigins: [] }).expect(200);
      await preflight('/api/v1/keys/current', 'http://localhost:4300').expect(403);
      await request(created.app)
        .patch(`/api/v1/keys/${other.body.id}`)
        .set(bearer(developer.token))
        .send({ allowedOrigins: ['http://localhost:4300'] })
        .expect(200);
      await preflight('/api/v1/keys/current', 'http://localhost:4300').expect(204);
      await request(created.app).delete(`/api/v1/keys/${other.body.id}`).set(bearer(developer.token)).expect(204);
      await preflight('/api/v1/keys/current', 'http://localhost:4300').expect(403);
    });
  });

  describe('actual requests', () => {
    it('a key that lists the page’s origin is answered with that origin allowed', async () => {
      const res = await request(created.app)
        .post('/api/v1/identify')
        .set({ ...bearer(trailKey), Origin: TRAIL })
        .send({ observations: [{ trait: 'needles-per-fascicle', values: [3] }] })
        .expect(200);
      expect(res.headers['access-control-allow-origin']).to.equal(TRAIL);
      expect(res.headers['vary']).to.match(/\bOrigin\b/);
      expect(res.headers['access-control-expose-headers']).to.include('RateLimit');
      expectNoCredentials(res.headers);
    });

    it('a key that does not list the page’s origin is refused with 403, even where anonymous callers are welcome', async () => {
      const keyed = await request(created.app)
        .get('/api/v1/keys/current')
        .set({ ...bearer(serverKey), Origin: TRAIL })
        .expect(403);
      expect(keyed.headers['content-type']).to.match(/^application\/problem\+json/);
      expect(keyed.headers).to.not.have.property('access-control-allow-origin');
      expect(keyed.body.detail).to.include(TRAIL);
      const open = await request(created.app)
        .get('/api/v1/traits')
        .set({ ...bearer(trailKey), Origin: STRANGER })
        .expect(403);
      expect(open.headers).to.not.have.property('access-control-allow-origin');
    });

    it('the refused request is not counted as the key’s use', async () => {
      const before = await request(created.app).get('/api/v1/keys/current').set(bearer(trailKey)).expect(200);
      await request(created.app)
        .get('/api/v1/traits')
        .set({ ...bearer(trailKey), Origin: STRANGER })
        .expect(403);
      const after = await request(created.app).get('/api/v1/keys/current').set(bearer(trailKey)).expect(200);
      // only the two /keys/current calls themselves were counted
      expect(after.body.usage.today - before.body.usage.today).to.equal(1);
    });

    it('anonymous lookups answer any origin with *', async () => {
      const res = await request(created.app).get('/api/v1/traits').set('Origin', STRANGER).expect(200);
      expect(res.headers['access-control-allow-origin']).to.equal('*');
      expectNoCredentials(res.headers);
    });

    it('requests without Origin carry no CORS headers', async () => {
      const plain = await request(created.app).get('/api/v1/traits').expect(200);
      expect(plain.headers).to.not.have.property('access-control-allow-origin');
      const server = await request(created.app).get('/api/v1/keys/current').set(bearer(serverKey)).expect(200);
      expect(server.headers).to.not.have.property('access-control-allow-origin');
    });
  });

  describe('allowed origins on the key', () => {
    it('are set on create and changed with PATCH, sorted without duplicates; the owner alone may change them', async () => {
      const made = await request(created.app)
        .post('/api/v1/keys')
        .set(bearer(developer.token))
        .send({ name: 'Two origins', scopes: ['lookup'], allowedOrigins: ['https://b.example', 'http://localhost:4200', 'https://b.example'] })
        .expect(201);
      expect(made.body.allowedOrigins).to.deep.equal(['http://localhost:4200', 'https://b.example']);
      const changed = await request(created.app)
        .patch(`/api/v1/keys/${made.body.id}`)
        .set(bearer(developer.token))
        .send({ allowedOrigins: ['https://c.example:8443'], name: 'Renamed' })
        .expect(200);
      expect(changed.body).to.include({ name: 'Renamed' });
      expect(changed.body.allowedOrigins).to.deep.equal(['https://c.example:8443']);
      const read = await request(created.app).get(`/api/v1/keys/${made.body.id}`).set(bearer(developer.token)).expect(200);
      expect(read.body.allowedOrigins).to.deep.equal(['https://c.example:8443']);
      const stranger = await signUpAndSignIn(created, 'coach');
      await request(created.app)
        .patch(`/api/v1/keys/${made.body.id}`)
        .set(bearer(stranger.token))
        .send({ allowedOrigins: [STRANGER] })
        .expect(404);
    });

    it('refuses what is not an origin: a path, a trailing slash, a wildcard, another scheme', async () => {
      for (const bad of ['https://trail.example/app', 'https://trail.example/', '*', 'ftp://trail.example', 'trail.example']) {
        const res = await request(created.app)
          .post('/api/v1/keys')
          .set(bearer(developer.token))
          .send({ name: 'Bad origin', scopes: ['lookup'], allowedOrigins: [bad] });
        expect(res.status, bad).to.equal(400);
      }
      await request(created.app).patch(`/api/v1/keys/${trailKeyId}`).set(bearer(developer.token)).send({}).expect(400);
    });
  });
});
