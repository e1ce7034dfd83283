import { createHash, randomUUID } from 'node:crypto';
import { expect } from 'chai';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { assertContractKept, startTestApp } from './support/test-app';
import { signUpAndSignIn, type SignedInUser } from './support/accounts';

/**
 * Idempotency-Key on the creating POSTs (IETF draft-ietf-httpapi-idempotency-key-header-06 §2:
 * a repeat with the same key and payload gets the first answer; §2.7: the same key with another
 * payload is 422, a repeat while the first is in flight is 409).
 */
describe('api: Idempotency-Key on creating POSTs', function () {
  this.timeout(60_000);
  let created: CreatedApp;
  let learner: SignedInUser;
  let coach: SignedInUser;
  let curator: SignedInUser;
  const bearer = (user: SignedInUser) => ({ Authorization: `Bearer ${user.token}` });
  const auditCount = (entity: string) => created.context.models.AuditEntry.count({ where: { entity } });

  before(async () => {
    created = await startTestApp();
    learner = await signUpAndSignIn(created, 'learner');
    coach = await signUpAndSignIn(created, 'coach');
    curator = await signUpAndSignIn(created, 'curator');
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  /** Recodes one cell of the working matrix to a value it has not had (a test edit, not a fact). */
  let recodings = 0;
  async function recodeACell(): Promise<void> {
    const url = '/api/v1/curation/cells/pinus-taeda/needle-length';
    const cell = await request(created.app).get(url).set(bearer(curator)).expect(200);
    await request(created.app)
      .put(url)
      .set(bearer(curator))
      .send({ value: { min: 10, low: 15, high: 23, max: 30 + ++recodings }, version: cell.body.version, reason: 'Idempotency test: something to publish' })
      .expect(200);
  }

  describe('partner keys', () => {
    it('a repeat answers the first key again (same id, same secret, same Location) and creates no second key', async () => {
      const key = randomUUID();
      const body = { name: 'Retried app', scopes: ['lookup'] };
      const first = await request(created.app).post('/api/v1/keys').set(bearer(learner)).set('Idempotency-Key', key).send(body).expect(201);
      expect(first.headers['idempotent-replayed']).to.equal(undefined);
      const again = await request(created.app).post('/api/v1/keys').set(bearer(learner)).set('Idempotency-Key', key).send(body).expect(201);
      expect(again.headers['idempotent-replayed']).to.equal('true');
      expect(again.headers['location']).to.equal(first.headers['location']).and.to.equal(`/api/v1/keys/${first.body.id}`);
      expect(again.body).to.deep.equal(first.body);
      expect(await created.context.models.PartnerKey.count({ where: { ownerId: learner.userId, name: 'Retried app' } })).to.equal(1);
      // the kept answer holds the secret only encrypted, and the Idempotency-Key only as a hash
      const rows = await created.context.models.IdempotencyRecord.findAll();
      const stored = JSON.stringify(rows.map((r) => r.toJSON()));
      expect(stored).not.to.include((first.body.key as string).slice(4));
      expect(stored).not.to.include(key);
      expect(rows.map((r) => r.idempotencyKey)).to.include(createHash('sha256').update(key).digest('hex'));
    });

    it('the same key with another body is refused with 422 and creates nothing', async () => {
      const key = randomUUID();
      await request(created.app)
        .post('/api/v1/keys')
        .set(bearer(learner))
        .set('Idempotency-Key', key)
        .send({ name: 'First body', scopes: ['lookup'] })
        .expect(201);
      const res = await request(created.app)
        .post('/api/v1/keys')
        .set(bearer(learner))
        .set('Idempotency-Key', key)
        .send({ name: 'Second body', scopes: ['lookup'] })
        .expect(422);
      expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
      expect(res.body.type).to.equal('/api/problems/idempotency-key-reused');
      expect(await created.context.models.PartnerKey.count({ where: { name: 'Second body' } })).to.equal(0);
    });

    it('belongs to one caller: another user sending the same key gets work of their own', async () => {
      const key = randomUUID();
      const body = { name: 'Shared idea', scopes: ['identify'] };
      const mine = await request(created.app).post('/api/v1/keys').set(bearer(learner)).set('Idempotency-Key', key).send(body).expect(201);
      const theirs = await request(created.app).post('/api/v1/keys').set(bearer(coach)).set('Idempotency-Key', key).send(body).expect(201);
      expect(theirs.body.id).to.not.equal(mine.body.id);
      expect(theirs.body.ownerId).to.equal(coach.userId);
      expect(theirs.headers['idempotent-replayed']).to.equal(undefined);
    });

    it('is kept 24 hours: an expired answer is not replayed, the work is done again', async () => {
      const key = randomUUID();
      const body = { name: 'Yesterday’s app', scopes: ['lookup'] };
      const first = await request(created.app).post('/api/v1/keys').set(bearer(learner)).set('Idempotency-Key', key).send(body).expect(201);
      const row = await created.context.models.IdempotencyRecord.findOne({ where: { idempotencyKey: createHash('sha256').update(key).digest('hex') } });
      if (!row) throw new Error('the first answer was not kept');
      expect(row.expiresAt.getTime() - row.createdAt.getTime()).to.be.within(24 * 3_600_000 - 1000, 24 * 3_600_000 + 1000);
      await created.context.models.IdempotencyRecord.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { id: row.id } });
      const later = await request(created.app).post('/api/v1/keys').set(bearer(learner)).set('Idempotency-Key', key).send(body).expect(201);
      expect(later.body.id).to.not.equal(first.body.id);
      expect(later.headers['idempotent-replayed']).to.equal(undefined);
    });

    it('a repeat while the first is still being handled gets 409', async () => {
      const key = randomUUID();
      const body = { name: 'Slow app', scopes: ['lookup'] };
      const first = await request(created.app).post('/api/v1/keys').set(bearer(learner)).set('Idempotency-Key', key).send(body).expect(201);
      // put the record back to "being handled", as it is between the claim and the answer
      await created.context.models.IdempotencyRecord.update(
        { status: null, body: null, location: null },
        { where: { idempotencyKey: createHash('sha256').update(key).digest('hex') } },
      );
      const res = await request(created.app).post('/api/v1/keys').set(bearer(learner)).set('Idempotency-Key', key).send(body).expect(409);
      expect(res.body.detail).to.include('still being handled');
      expect(await created.context.models.PartnerKey.count({ where: { name: 'Slow app' } })).to.equal(1);
      expect(first.body.name).to.equal('Slow app');
    });

    it('refuses a key that is not 1–255 visible characters; a quoted key is the same key unquoted', async () => {
      await request(created.app)
        .post('/api/v1/keys')
        .set(bearer(learner))
        .set('Idempotency-Key', 'has spaces in it')
        .send({ name: 'x', scopes: ['lookup'] })
        .expect(400);
      await request(created.app)
        .post('/api/v1/keys')
        .set(bearer(learner))
        .set('Idempotency-Key', 'k'.repeat(256))
        .send({ name: 'x', scopes: ['lookup'] })
        .expect(400);
      const key = randomUUID();
      const first = await request(created.app)
        .post('/api/v1/keys')
        .set(bearer(learner))
        .set('Idempotency-Key', `"${key}"`)
        .send({ name: 'Quoted', scopes: ['lookup'] })
        .expect(201);
      const again = await request(created.app)
        .post('/api/v1/keys')
        .set(bearer(learner))
        .set('Idempotency-Key', key)
        .send({ name: 'Quoted', scopes: ['lookup'] })
        .expect(201);
      expect(again.body.id).to.equal(first.body.id);
    });

    it('without the header every POST does the work', async () => {
      const body = { name: 'No header', scopes: ['lookup'] };
      const a = await request(created.app).post('/api/v1/keys').set(bearer(learner)).send(body).expect(201);
      const b = await request(created.app).post('/api/v1/keys').set(bearer(learner)).send(body).expect(201);
      expect(a.body.id).to.not.equal(b.body.id);
    });
  });

  describe('editions', () => {
    it('a double publish with one key creates one edition and answers it twice', async () => {
      await recodeACell();
      const before = await created.context.models.Edition.count();
      const key = randomUUID();
      const body = { title: 'Published once', reason: 'the field laptop retried' };
      const first = await request(created.app).post('/api/v1/editions').set(bearer(curator)).set('Idempotency-Key', key).send(body).expect(201);
      const again = await request(created.app).post('/api/v1/editions').set(bearer(curator)).set('Idempotency-Key', key).send(body).expect(201);
      expect(again.body).to.deep.equal(first.body);
      expect(again.headers['location']).to.equal(`/api/v1/editions/${first.body.number}`);
      expect(again.headers['idempotent-replayed']).to.equal('true');
      expect(await created.context.models.Edition.count()).to.equal(before + 1);
    });

    it('a refused publish is not kept: after a change, the same key publishes', async () => {
      const key = randomUUID();
      const body = { title: 'Second try', reason: 'nothing changed the first time' };
      const refused = await request(created.app).post('/api/v1/editions').set(bearer(curator)).set('Idempotency-Key', key).send(body).expect(409);
      expect(refused.body.reason).to.equal('no-changes');
      await recodeACell();
      const published = await request(created.app).post('/api/v1/editions').set(bearer(curator)).set('Idempotency-Key', key).send(body).expect(201);
      expect(published.headers['idempotent-replayed']).to.equal(undefined);
    });
  });

  describe('queries, study sets and imports', () => {
    it('a repeated query is raised once', async () => {
      const key = randomUUID();
      const body = { taxonId: 'pinus-taeda', traitCode: 'needle-form', note: 'Raised from a flaky connection.' };
      const before = await created.context.models.Query.count();
      const first = await request(created.app).post('/api/v1/queries').set(bearer(learner)).set('Idempotency-Key', key).send(body).expect(201);
      const again = await request(created.app).post('/api/v1/queries').set(bearer(learner)).set('Idempotency-Key', key).send(body).expect(201);
      expect(again.body).to.deep.equal(first.body);
      expect(again.headers['location']).to.equal(first.headers['location']);
      expect(await created.context.models.Query.count()).to.equal(before + 1);
    });

    it('a repeated study set is created once', async () => {
      const key = randomUUID();
      const body = { name: 'Autumn walk, retried', taxa: ['pinus-taeda', 'quercus-alba'] };
      const first = await request(created.app).post('/api/v1/study-sets').set(bearer(coach)).set('Idempotency-Key', key).send(body).expect(201);
      const again = await request(created.app).post('/api/v1/study-sets').set(bearer(coach)).set('Idempotency-Key', key).send(body).expect(201);
      expect(again.body).to.deep.equal(first.body);
      expect(again.headers['location']).to.equal(first.headers['location']);
      expect(await created.context.models.StudySet.count({ where: { name: body.name } })).to.equal(1);
    });

    it('a repeated import is applied once; another file with the same key is refused', async () => {
      // a test recoding, not a fact: loblolly's needles as 9–13 cm
      const csv = 'taxon,trait,usual,occasional,rare,min,low,high,max,state\r\npinus-taeda,needle-length,,,,8,9,13,14,\r\n';
      const key = randomUUID();
      const send = (content: string) =>
        request(created.app)
          .post('/api/v1/curation/imports')
          .query({ mode: 'apply' })
          .set(bearer(curator))
          .set('Idempotency-Key', key)
          .attach('file', Buffer.from(content, 'utf8'), 'retry.csv');
      const imports = await auditCount('import');
      const first = await send(csv).expect(200);
      expect(first.body.changes).to.have.length(1);
      const again = await send(csv).expect(200);
      expect(again.body).to.deep.equal(first.body);
      expect(again.headers['idempotent-replayed']).to.equal('true');
      expect(await auditCount('import')).to.equal(imports + 1);
      const other = await send(csv.replace('8,9,13,14', '7,9,13,14')).expect(422);
      expect(other.body.type).to.equal('/api/problems/idempotency-key-reused');
      expect(await auditCount('import')).to.equal(imports + 1);
    });
  });
});
