import { expect } from 'chai';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import type { CreatedApp } from '../../api/src/app';
import { migrations } from '../../api/src/db/migrations';
import { assertContractKept, startTestApp } from './support/test-app';
import { signUpAndSignIn, type SignedInUser } from './support/accounts';
import { testDialect } from './support/test-database';

/**
 * What only PostgreSQL can show: two processes on one database (here two apps, each with its own
 * connection pool, on the same database) writing at once. The other API suites run on PostgreSQL
 * too (TEST_DATABASE=postgres); this one is registered only then.
 */
if (testDialect() === 'postgres') {
  describe('api: PostgreSQL', function () {
    this.timeout(60_000);
    // one database for both apps: a sqlite: file URL maps to one PostgreSQL database per file name
    const shared = { DATABASE_URL: 'sqlite:/postgres-spec/two-processes.sqlite' };
    let first: CreatedApp;
    let second: CreatedApp;
    let curatorOfFirst: SignedInUser;
    let curatorOfSecond: SignedInUser;
    const bearer = (user: SignedInUser) => ({ Authorization: `Bearer ${user.token}` });

    before(async () => {
      first = await startTestApp(shared);
      second = await startTestApp(shared);
      curatorOfFirst = await signUpAndSignIn(first, 'curator');
      curatorOfSecond = await signUpAndSignIn(second, 'curator');
    });
    afterEach(() => {
      assertContractKept(first);
      assertContractKept(second);
    });
    after(async () => {
      await first?.close();
      await second?.close();
    });

    it('opens the database with a pool, migrated once, with foreign keys enforced', async () => {
      expect(first.context.sequelize.getDialect()).to.equal('postgres');
      const names = await first.context.sequelize.query<{ name: string }>('SELECT name FROM schema_migrations ORDER BY name', { type: QueryTypes.SELECT });
      expect(
        names.map((n) => n.name),
        'the second app found the schema up to date',
      ).to.deep.equal(migrations.map((m) => m.name).sort());
      let rejected = false;
      try {
        await first.context.models.Cell.create({ taxonId: 'no-such-taxon', traitCode: 'foliage', value: 'unknown' });
      } catch {
        rejected = true;
      }
      expect(rejected, 'a cell pointing at a missing taxon must be rejected').to.equal(true);
    });

    /** Recodes one cell of the working matrix to a value it has not had (a test edit, not a fact). */
    async function recodeACell(round: number): Promise<void> {
      const url = '/api/v1/curation/cells/pinus-taeda/needle-length';
      const cell = await request(first.app).get(url).set(bearer(curatorOfFirst)).expect(200);
      await request(first.app)
        .put(url)
        .set(bearer(curatorOfFirst))
        .send({ value: { min: 10, low: 15, high: 23, max: 40 + round }, version: cell.body.version, reason: `Concurrent publishing, round ${round}` })
        .expect(200);
    }

    it('gives publishes from two processes at once consecutive edition numbers: one edition per change, the other told nothing changed', async () => {
      const latest = (await first.context.models.Edition.max('number')) as number;
      const publish = (app: CreatedApp, curator: SignedInUser, i: number) =>
        request(app.app)
          .post('/api/v1/editions')
          .set(bearer(curator))
          .send({ title: `Concurrent edition ${i}`, reason: 'two processes publish at once' });
      for (const round of [1, 2, 3]) {
        await recodeACell(round);
        const answers = await Promise.all([publish(first, curatorOfFirst, round), publish(second, curatorOfSecond, round)]);
        expect(answers.map((a) => a.status).sort(), `round ${round}`).to.deep.equal([201, 409]);
        const published = answers.find((a) => a.status === 201);
        expect(published?.body.number).to.equal(latest + round);
        expect(answers.find((a) => a.status === 409)?.body).to.include({ reason: 'no-changes', basedOn: latest + round });
      }
      expect(await first.context.models.Edition.max('number')).to.equal(latest + 3);
    });

    it('lets exactly one of two processes create a never-written cell; the other gets 409, not an error', async () => {
      // the reference matrix codes every cell: forget one, so it reads as never written (unknown, version 0)
      const free = { taxonId: 'pinus-taeda', traitCode: 'bark-texture' };
      expect(await first.context.models.Cell.destroy({ where: free })).to.equal(1);
      const url = `/api/v1/curation/cells/${free.taxonId}/${free.traitCode}`;
      const read = await request(first.app).get(url).set(bearer(curatorOfFirst)).expect(200);
      expect(read.body.version).to.equal(0);
      const [a, b] = await Promise.all([
        request(first.app).put(url).set(bearer(curatorOfFirst)).send({ value: 'unknown', version: 0, reason: 'first process' }),
        request(second.app).put(url).set(bearer(curatorOfSecond)).send({ value: 'unknown', version: 0, reason: 'second process' }),
      ]);
      expect([a.status, b.status].sort()).to.deep.equal([200, 409]);
      const stored = await second.context.models.Cell.findAll({ where: { taxonId: free.taxonId, traitCode: free.traitCode } });
      expect(stored.map((c) => c.version)).to.deep.equal([1]);
    });
  });
}
