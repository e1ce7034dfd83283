import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { expect } from 'chai';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { loadOpenApiDocument } from '../../api/src/docs/openapi-document';
import { OPENAPI_PATH } from '../../api/src/config';
import { PROBLEM_TYPES } from '../../api/src/http/problem-types';
import { createPartnerKey, signUpAndSignIn, type SignedInUser } from './support/accounts';
import { assertContractKept, startTestApp } from './support/test-app';

/** A raw request, for what supertest would tidy up (a body without any Content-Type). */
async function rawPost(
  created: CreatedApp,
  path: string,
  headers: Record<string, string>,
  body: string,
): Promise<{ status: number; body: { detail: string } }> {
  const server = http.createServer(created.app).listen(0);
  try {
    const { port } = server.address() as AddressInfo;
    return await new Promise((resolve, reject) => {
      const req = http.request({ port, path, method: 'POST', headers: { ...headers, 'Content-Length': String(Buffer.byteLength(body)) } }, (res) => {
        let text = '';
        res.on('data', (chunk: Buffer) => (text += chunk.toString('utf8')));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, body: JSON.parse(text) as { detail: string } }));
      });
      req.on('error', reject);
      req.end(body);
    });
  } finally {
    server.close();
  }
}

describe('api: HTTP details a partner developer runs into', () => {
  let created: CreatedApp;
  let learner: SignedInUser;

  before(async () => {
    created = await startTestApp();
    learner = await signUpAndSignIn(created, 'learner');
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  describe('the taxa search', () => {
    it('reads + in q as a space, as URLSearchParams and HTML forms encode it (WHATWG URL, application/x-www-form-urlencoded)', async () => {
      const query = new URLSearchParams({ q: 'sugr mapel' }).toString();
      expect(query).to.equal('q=sugr+mapel');
      const plus = await request(created.app).get(`/api/v1/taxa?${query}`).expect(200);
      const percent = await request(created.app).get('/api/v1/taxa?q=sugr%20mapel').expect(200);
      expect(plus.body.query).to.equal('sugr mapel');
      expect(plus.body.items.map((item: { id: string }) => item.id)).to.deep.equal(percent.body.items.map((item: { id: string }) => item.id));
      expect(plus.body.items[0].id).to.equal('acer-saccharum');
    });
  });

  describe('the edition bundle', () => {
    it('answers 304 to a matching If-None-Match even with Cache-Control: no-cache, as fetch() sends on a reload (RFC 9110 §13.1.2)', async () => {
      const first = await request(created.app).get('/api/v1/editions/current/bundle').expect(200);
      const etag = first.headers['etag'] as string;
      const again = await request(created.app).get('/api/v1/editions/current/bundle').set('If-None-Match', etag).set('Cache-Control', 'no-cache').expect(304);
      expect(again.headers['etag']).to.equal(etag);
      await request(created.app).get('/api/v1/editions/current/bundle').set('If-None-Match', `W/${etag}, "other"`).expect(304);
      await request(created.app).get('/api/v1/editions/current/bundle').set('If-None-Match', '"edition-0-stale"').set('Cache-Control', 'no-cache').expect(200);
    });
  });

  describe('partner keys', () => {
    it("answers a new key's Location with that key, to its owner only", async () => {
      const created201 = await request(created.app)
        .post('/api/v1/keys')
        .set('Authorization', `Bearer ${learner.token}`)
        .send({ name: 'Trail app', scopes: ['lookup'] })
        .expect(201);
      const location = created201.headers['location'] as string;
      const read = await request(created.app).get(location).set('Authorization', `Bearer ${learner.token}`).expect(200);
      expect(read.body).to.include({ id: created201.body.id, name: 'Trail app', prefix: created201.body.prefix });
      expect(read.body).to.not.have.property('key');
      expect(read.body.usage).to.deep.equal({ today: 0, days: [] });
      const stranger = await signUpAndSignIn(created, 'learner');
      await request(created.app).get(location).set('Authorization', `Bearer ${stranger.token}`).expect(404);
    });
  });

  describe('methods', () => {
    it('names the allowed methods in Allow on a 405 (RFC 9110 §15.5.6)', async () => {
      const res = await request(created.app).put('/api/v1/traits').expect(405);
      expect(res.headers['allow']).to.equal('GET, HEAD');
      const keys = await request(created.app).put('/api/v1/keys/3').set('Authorization', `Bearer ${learner.token}`).expect(405);
      expect(keys.headers['allow']).to.equal('GET, HEAD, DELETE, PATCH');
      const bundle = await request(created.app).post('/api/v1/editions/current/bundle').expect(405);
      expect(bundle.headers['allow']).to.equal('GET, HEAD');
    });

    it('answers HEAD wherever GET is answered, with the same headers and no body (RFC 9110 §9.3.2)', async () => {
      for (const path of ['/api/v1/traits', '/api/v1/taxa?q=oak', '/api/v1/taxa/pinus-taeda', '/api/v1/editions/current/bundle']) {
        // the same request headers for both (supertest asks for gzip on GET only), so the same representation
        const get = await request(created.app).get(path).set('Accept-Encoding', 'gzip').expect(200);
        const head = await request(created.app).head(path).set('Accept-Encoding', 'gzip').expect(200);
        expect(head.headers['etag'], path).to.equal(get.headers['etag']);
        expect(head.headers['content-type'], path).to.equal(get.headers['content-type']);
        expect(head.text ?? '', path).to.equal('');
      }
    });
  });

  describe('credentials', () => {
    it('says the Bearer scheme is missing when a token is sent bare', async () => {
      const { key } = await createPartnerKey(created, learner.token, ['lookup']);
      const res = await request(created.app).get('/api/v1/taxa').set('Authorization', key).expect(401);
      expect(res.body.detail).to.include('no scheme').and.include('Authorization: Bearer <token>');
      expect(res.headers['www-authenticate']).to.match(/^Bearer realm=/);
      const basic = await request(created.app)
        .get('/api/v1/taxa')
        .set('Authorization', `Basic ${Buffer.from('a:b').toString('base64')}`)
        .expect(401);
      expect(basic.body.detail).to.include('"Basic"').and.include('Authorization: Bearer <token>');
      await request(created.app).get('/api/v1/taxa').set('Authorization', `Bearer ${key}`).expect(200);
    });

    it('refuses an anonymous caller of a protected route with 401 before it looks at the body', async () => {
      const res = await request(created.app).post('/api/v1/curation/taxa').send({ id: 'Not An Id', scientificName: 1 }).expect(401);
      expect(res.body).to.not.have.property('invalid-params');
      const learnerTries = await request(created.app)
        .post('/api/v1/curation/taxa')
        .set('Authorization', `Bearer ${learner.token}`)
        .send({ id: 'Not An Id' })
        .expect(403);
      expect(learnerTries.body.detail).to.include('curator');
    });
  });

  describe('bodies', () => {
    it('says the Content-Type is missing and which one is expected', async () => {
      const res = await rawPost(created, '/api/v1/identify', { Authorization: `Bearer ${learner.token}` }, JSON.stringify({ observations: [] }));
      expect(res.status).to.equal(415);
      expect(res.body.detail).to.equal('The request has a body but no Content-Type header; send it as application/json.');
      const wrong = await request(created.app)
        .post('/api/v1/identify')
        .set('Authorization', `Bearer ${learner.token}`)
        .set('Content-Type', 'text/plain')
        .send('{}')
        .expect(415);
      expect(wrong.body.detail).to.equal('This endpoint takes application/json, not text/plain.');
    });

    it('states the size limit on a 413', async () => {
      const res = await request(created.app)
        .post('/api/v1/identify')
        .set('Authorization', `Bearer ${learner.token}`)
        .set('Content-Type', 'application/json')
        .send(JSON.stringify({ observations: [], padding: 'x'.repeat(300_000) }))
        .expect(413);
      expect(res.body.detail).to.include('at most 256 kB (262144 bytes)');
    });

    it('refuses a count sent as text, naming the field', async () => {
      const res = await request(created.app)
        .post('/api/v1/identify')
        .set('Authorization', `Bearer ${learner.token}`)
        .send({
          observations: [
            { trait: 'foliage', values: ['needle'] },
            { trait: 'needles-per-fascicle', values: ['3'] },
          ],
        })
        .expect(400);
      expect(res.body['invalid-params']).to.deep.include({
        name: '/body/observations/1/values',
        reason: 'needles-per-fascicle is a count: send whole numbers, not text ("3" → 3).',
      });
      await request(created.app)
        .post('/api/v1/identify')
        .set('Authorization', `Bearer ${learner.token}`)
        .send({
          observations: [
            { trait: 'foliage', values: ['needle'] },
            { trait: 'needles-per-fascicle', values: [3] },
          ],
        })
        .expect(200);
    });

    it('refuses a measurement sent as text instead of coercing it', async () => {
      const res = await request(created.app)
        .post('/api/v1/identify')
        .set('Authorization', `Bearer ${learner.token}`)
        .send({ observations: [{ trait: 'needle-length', value: '6', unit: 'in' }] })
        .expect(400);
      expect(res.body['invalid-params'].map((param: { name: string }) => param.name)).to.include('/body/observations/0/value');
    });
  });

  describe('unknown species', () => {
    it('suggests close taxa for a mistyped id on the species page', async () => {
      const res = await request(created.app).get('/api/v1/taxa/pinus-tada').expect(404);
      expect(res.body.suggestions[0]).to.include({ id: 'pinus-taeda', scientificName: 'Pinus taeda' });
      expect(res.body.detail).to.include('Did you mean pinus-taeda (Pinus taeda, loblolly pine)');
    });

    it('suggests close taxa for a mistyped id in Side by side, on the offending item', async () => {
      const res = await request(created.app)
        .post('/api/v1/compare')
        .send({ taxa: ['pinus-echinata', 'acer-sacharum'] })
        .expect(400);
      const item = res.body['invalid-params'].find((param: { name: string }) => param.name === '/body/taxa/1');
      expect(item.suggestions[0].id).to.equal('acer-saccharum');
      expect(item.reason).to.include('Did you mean acer-saccharum (Acer saccharum, sugar maple)');
    });
  });

  describe('species page', () => {
    it('names look-alikes by their names in the diagnostic sentences, not by ids', async () => {
      const res = await request(created.app).get('/api/v1/taxa/pinus-taeda').expect(200);
      const traits = res.body.diagnostic.traits as Array<{ text: string; separates: string[] }>;
      expect(traits.length).to.be.greaterThan(0);
      for (const trait of traits) {
        for (const id of trait.separates) expect(trait.text, trait.text).to.not.match(new RegExp(`(^|[^\\w-])${id}([^\\w-]|$)`));
      }
      const lookAlikes = res.body.lookAlikes as Array<{ id: string; scientificName: string }>;
      const named = traits.flatMap((trait) => trait.separates).map((id) => lookAlikes.find((taxon) => taxon.id === id)?.scientificName);
      expect(traits.map((trait) => trait.text).join(' ')).to.include(named[0]);
    });
  });

  describe('problem types', () => {
    it('answers every problem type with a page, and openapi.yaml lists exactly those types', async () => {
      for (const [name, { title }] of Object.entries(PROBLEM_TYPES)) {
        const page = await request(created.app).get(`/api/problems/${name}`).expect(200);
        expect(page.headers['content-type'], name).to.match(/^text\/html/);
        expect(page.text, name).to.include(title.replace(/&/g, '&#38;'));
      }
      await request(created.app).get('/api/problems/no-such-problem').expect(404);
      const parameter = loadOpenApiDocument(OPENAPI_PATH).paths?.['/api/problems/{name}']?.get?.parameters?.[0] as { schema: { enum: string[] } };
      expect([...parameter.schema.enum].sort()).to.deep.equal(Object.keys(PROBLEM_TYPES).sort());
    });

    it('points the type of problems actually sent at pages that resolve', async () => {
      const answers = [
        await request(created.app).get('/api/v1/taxa/no-such-taxon'),
        await request(created.app).put('/api/v1/traits'),
        await request(created.app).post('/api/v1/curation/taxa').send({}),
        await request(created.app)
          .post('/api/v1/compare')
          .send({ taxa: ['pinus-taeda'] }),
      ];
      for (const answer of answers) {
        expect(answer.body.type).to.match(/^\/api\/problems\/[a-z-]+$/);
        const page = await request(created.app).get(new URL(answer.body.type, 'http://localhost/api/v1/taxa/').pathname).expect(200);
        expect(page.text).to.include(answer.body.title);
      }
    });
  });
});
