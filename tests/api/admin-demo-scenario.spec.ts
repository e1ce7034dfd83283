import { expect } from 'chai';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, demoSignInLines } from '../../api/src/db/seeders/0002-demo-scenario';
import { loadConfig } from '../../api/src/config';
import { assertContractKept, startTestApp } from './support/test-app';

const DEMO_KEY = 'svk_demo-fernway-trails-0123456789abcdefABCDEF';
const PRODUCTION = { NODE_ENV: 'production', SMTP_URL: 'smtp://127.0.0.1:2525', DATABASE_URL: 'sqlite::memory:', LOG_LEVEL: 'silent', SCRYPT_N: '1024' };

describe('api: the demo scenario', () => {
  let created: CreatedApp;

  before(async () => {
    created = await startTestApp({ DEMO_PARTNER_KEY: DEMO_KEY });
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  it('seeds a coach, three students, a curator, a reviewer, an admin and a partner developer who can sign in', async () => {
    const roles = DEMO_ACCOUNTS.map((a) => a.role).sort();
    expect(roles).to.deep.equal(['admin', 'coach', 'curator', 'learner', 'learner', 'learner', 'learner', 'reviewer']);
    for (const account of DEMO_ACCOUNTS) {
      const res = await request(created.app).post('/api/v1/sessions').send({ email: account.email, password: DEMO_PASSWORD }).expect(201);
      expect(res.body.account).to.include({ role: account.role, displayName: account.displayName });
    }
  });

  it('gives the partner developer exactly the DEMO_PARTNER_KEY token, with lookup and identify', async () => {
    await request(created.app).get('/api/v1/traits').set('Authorization', `Bearer ${DEMO_KEY}`).expect(200);
    await request(created.app)
      .post('/api/v1/identify')
      .set('Authorization', `Bearer ${DEMO_KEY}`)
      .send({ observations: [{ trait: 'needles-per-fascicle', values: [3] }] })
      .expect(200);
  });

  it('leaves open queries on real cells of the reference matrix in the Second look queue', async () => {
    const reviewer = DEMO_ACCOUNTS.find((a) => a.role === 'reviewer');
    const session = await request(created.app).post('/api/v1/sessions').send({ email: reviewer?.email, password: DEMO_PASSWORD }).expect(201);
    const queue = await request(created.app).get('/api/v1/queries').query({ state: 'open' }).set('Authorization', `Bearer ${session.body.token}`).expect(200);
    expect(queue.body.queries.length).to.be.at.least(2);
    for (const query of queue.body.queries as Array<{ taxonId: string; traitCode: string }>) {
      expect(await created.context.models.Cell.count({ where: { taxonId: query.taxonId, traitCode: query.traitCode } })).to.equal(1);
    }
  });

  it('prints demo sign-ins only in development', () => {
    expect(demoSignInLines(loadConfig({ NODE_ENV: 'test' }))).to.deep.equal([]);
    expect(demoSignInLines(loadConfig(PRODUCTION))).to.deep.equal([]);
    const lines = demoSignInLines(loadConfig({ NODE_ENV: 'development' }));
    expect(lines.join('\n'))
      .to.include(DEMO_PASSWORD)
      .and.to.include(DEMO_ACCOUNTS[0]?.email ?? 'missing');
  });

  it('is skipped in production unless SEED_DEMO=true, and then without the known demo password', async () => {
    const production = await startTestApp(PRODUCTION);
    try {
      expect(await production.context.models.User.count()).to.equal(0);
    } finally {
      await production.close();
    }
    const seeded = await startTestApp({ ...PRODUCTION, SEED_DEMO: 'true' });
    try {
      expect(await seeded.context.models.User.count()).to.equal(DEMO_ACCOUNTS.length);
      await request(seeded.app).post('/api/v1/sessions').send({ email: DEMO_ACCOUNTS[0]?.email, password: DEMO_PASSWORD }).expect(401);
    } finally {
      await seeded.close();
    }
  });
});
