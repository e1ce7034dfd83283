import { expect } from 'chai';
import request from 'supertest';
import { createApp, type CreatedApp } from '../../api/src/app';
import { loadConfig, ConfigError } from '../../api/src/config';

describe('api: health, errors and headers', () => {
  let created: CreatedApp;

  before(async () => {
    created = await createApp(loadConfig({ NODE_ENV: 'test' }));
  });
  after(() => created.close());

  it('GET /api/health reports ok with a reachable database and is never cached', async () => {
    const res = await request(created.app).get('/api/health').expect(200);
    expect(res.body).to.deep.include({ status: 'ok', database: 'ok' });
    expect(res.body.version).to.be.a('string').and.not.equal('');
    expect(res.headers['cache-control']).to.equal('no-store');
  });

  it('GET /api/health answers 503 degraded when the database is gone', async () => {
    const other = await createApp(loadConfig({ NODE_ENV: 'test' }));
    await other.close();
    const res = await request(other.app).get('/api/health').expect(503);
    expect(res.body).to.deep.include({ status: 'degraded', database: 'unreachable' });
  });

  // RFC 9457 §3: a problem has type, title, status and detail, served as application/problem+json.
  it('answers unknown API routes with a 404 problem', async () => {
    const res = await request(created.app).get('/api/v0/nothing-here').expect(404);
    expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
    expect(res.body).to.include.keys('type', 'title', 'status', 'detail');
    expect(res.body.status).to.equal(404);
    expect(res.body.type).to.match(/\/problems\/not-found$/);
  });

  it('answers malformed JSON with a 400 problem instead of a crash', async () => {
    const res = await request(created.app).post('/api/v0/anything').set('Content-Type', 'application/json').send('{"observations": [').expect(400);
    expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
    expect(res.body.type).to.match(/\/problems\/malformed-json$/);
  });

  it('sends the usual security headers (helmet) and no X-Powered-By', async () => {
    const res = await request(created.app).get('/api/health');
    expect(res.headers['x-content-type-options']).to.equal('nosniff');
    expect(res.headers['content-security-policy']).to.contain("script-src 'self'");
    expect(res.headers).to.not.have.property('x-powered-by');
  });

  it('serves Swagger UI at /api/docs and the contract as JSON', async () => {
    const docs = await request(created.app).get('/api/docs/').expect(200);
    expect(docs.text).to.contain('swagger-ui');
    const contract = await request(created.app).get('/api/openapi.json').expect(200);
    expect(contract.body.openapi).to.match(/^3\.1\./);
  });

  it('rejects bad configuration with every problem listed', () => {
    expect(() => loadConfig({ PORT: 'eighty', NODE_ENV: 'staging' })).to.throw(ConfigError, /PORT[\s\S]*NODE_ENV|NODE_ENV[\s\S]*PORT/);
  });
});
