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
      expect(names.map((n) => n.name), 'the second app found the schema up to date').to.deep.equal(migrations.map((m) => m.name).sort());
      let rejected = false;
      try {
        await first.context.models.Cell.create({ taxonId: 'no-such-taxon', traitCode: 'foliage', value: 'unknown' });
      } catch {
        rejected = true;
      }
      expect(rejected, 'a cell pointing at a missing taxon must be rejected').to.equal(true);
    });

    it('gives publishes from two processes at once consecutive edition numbers, none failing', async () => {
      const latest = (await first.context.models.Edition.max('number')) as number;
      const publish = (app: CreatedApp, curator: SignedInUser, i: number) =>
        request(app.app).post('/api/v1/editions').set(bearer(curator)).send({ title: `Concurrent edition ${i}`, reason: 'two processes publish at once' });
      const answers = await Promise.all([0, 1, 2].flatMap((i) => [publish(first, curatorOfFirst, i), publish(second, curatorOfSecond, i)]));
      expect(answers.map((a) => a.status)).to.deep.equal([201, 201, 201, 201, 201, 201]);
      const numbers = answers.map((a) => a.body.number as number).sort((a, b) => a - b);
      expect(numbers).to.deep.equal([1, 2, 3, 4, 5, 6].map((n) => latest + n));
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
