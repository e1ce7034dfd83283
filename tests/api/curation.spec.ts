import { expect } from 'chai';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { signUpAndSignIn, type SignedInUser } from './support/accounts';
import { assertContractKept, startTestApp } from './support/test-app';

const CELL = '/api/v1/curation/cells/pinus-taeda/needle-length';

describe('api: curation (Matrix desk)', () => {
  let created: CreatedApp;
  let curator: SignedInUser;
  let learner: SignedInUser;

  before(async () => {
    created = await startTestApp();
    curator = await signUpAndSignIn(created, 'curator');
    learner = await signUpAndSignIn(created, 'learner');
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  const as = (user: SignedInUser) => ({
    get: (url: string) => request(created.app).get(url).set('Authorization', `Bearer ${user.token}`),
    put: (url: string, body: object) => request(created.app).put(url).set('Authorization', `Bearer ${user.token}`).send(body),
    post: (url: string, body: object) => request(created.app).post(url).set('Authorization', `Bearer ${user.token}`).send(body),
    patch: (url: string, body: object) => request(created.app).patch(url).set('Authorization', `Bearer ${user.token}`).send(body),
  });
  const auditCount = () => created.context.models.AuditEntry.count();
  const storedCell = async (taxonId: string, traitCode: string) => {
    const row = await created.context.models.Cell.findOne({ where: { taxonId, traitCode } });
    return row ? { value: row.value, version: row.version } : undefined;
  };

  describe('who may edit', () => {
    it('needs a signed-in curator: 401 anonymous, 403 learner', async () => {
      await request(created.app).get(CELL).expect(401);
      const res = await as(learner).put(CELL, { value: 'unknown', version: 1, reason: 'testing roles' }).expect(403);
      expect(res.body.type).to.match(/\/problems\/forbidden$/);
      expect((await storedCell('pinus-taeda', 'needle-length'))?.version).to.equal(1);
    });
  });

  describe('cells with optimistic locking', () => {
    it('reads a cell with its version, and an uncoded cell as unknown at version 0', async () => {
      const res = await as(curator).get(CELL).expect(200);
      expect(res.body.version).to.equal(1);
      expect(res.body.value).to.have.keys('min', 'low', 'high', 'max');
      expect(res.headers['cache-control']).to.match(/private/);
      const missing = await as(curator).get('/api/v1/curation/cells/pinus-taeda/no-such-trait').expect(404);
      expect(missing.body.detail).to.contain('no-such-trait');
    });

    it('saves a change at the version read, bumps the version and logs who, what and why', async () => {
      const before = (await as(curator).get(CELL).expect(200)).body;
      const value = { min: 10, low: 12, high: 23, max: 25 };
      const res = await as(curator).put(CELL, { value, version: before.version, reason: 'Longest needles on herbarium sheets' }).expect(200);
      expect(res.body).to.deep.equal({ taxonId: 'pinus-taeda', traitCode: 'needle-length', value, version: before.version + 1 });
      expect(await storedCell('pinus-taeda', 'needle-length')).to.deep.equal({ value, version: before.version + 1 });
      const audit = await as(curator).get('/api/v1/curation/audit').query({ entity: 'cell', key: 'pinus-taeda/needle-length' }).expect(200);
      const entry = audit.body.entries[0];
      expect(entry.actor).to.deep.equal({ userId: curator.userId, email: curator.email });
      expect(entry.before).to.deep.equal(before.value);
      expect(entry.after).to.deep.equal(value);
      expect(entry.reason).to.equal('Longest needles on herbarium sheets');
    });

    it('refuses a stale version with 409 carrying the current value and version, and writes nothing', async () => {
      const now = (await as(curator).get(CELL).expect(200)).body;
      const auditBefore = await auditCount();
      const res = await as(curator)
        .put(CELL, { value: 'unknown', version: now.version - 1, reason: 'stale edit' })
        .expect(409);
      expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
      expect(res.body.current).to.deep.equal({ value: now.value, version: now.version });
      expect(await storedCell('pinus-taeda', 'needle-length')).to.deep.equal({ value: now.value, version: now.version });
      expect(await auditCount()).to.equal(auditBefore);
    });

    it('lets exactly one of two simultaneous edits of the same version win (no lost update)', async () => {
      const now = (await as(curator).get(CELL).expect(200)).body;
      const other = await signUpAndSignIn(created, 'curator');
      const [a, b] = await Promise.all([
        as(curator).put(CELL, { value: { min: 9, low: 12, high: 20, max: 24 }, version: now.version, reason: 'first curator' }),
        as(other).put(CELL, { value: { min: 11, low: 13, high: 21, max: 23 }, version: now.version, reason: 'second curator' }),
      ]);
      expect([a.status, b.status].sort()).to.deep.equal([200, 409]);
      const winner = a.status === 200 ? a : b;
      expect(await storedCell('pinus-taeda', 'needle-length')).to.deep.equal({ value: winner.body.value, version: now.version + 1 });
    });

    it('creates a never-written cell at version 0 and refuses a second create', async () => {
      await created.context.models.Cell.destroy({ where: { taxonId: 'pinus-strobus', traitCode: 'bark-color' } });
      const url = '/api/v1/curation/cells/pinus-strobus/bark-color';
      expect((await as(curator).get(url).expect(200)).body).to.deep.include({ value: 'unknown', version: 0 });
      await as(curator)
        .put(url, { value: { usual: ['gray'] }, version: 0, reason: 'coded from the plate' })
        .expect(200);
      await as(curator)
        .put(url, { value: { usual: ['brown'] }, version: 0, reason: 'a second create' })
        .expect(409);
      expect((await storedCell('pinus-strobus', 'bark-color'))?.value).to.deep.equal({ usual: ['gray'] });
    });

    it('refuses values that do not fit the trait with 422 and writes nothing', async () => {
      const url = '/api/v1/curation/cells/pinus-taeda/leaf-arrangement';
      const now = (await as(curator).get(url).expect(200)).body;
      const auditBefore = await auditCount();
      const unknownCode = await as(curator)
        .put(url, { value: { usual: ['spiral-ish'] }, version: now.version, reason: 'bad code' })
        .expect(422);
      expect(unknownCode.body.type).to.match(/\/problems\/matrix-invalid$/);
      expect(unknownCode.body.detail).to.contain('spiral-ish');
      await as(curator)
        .put(url, { value: { min: 1, low: 2, high: 3, max: 4 }, version: now.version, reason: 'range on a state trait' })
        .expect(422);
      const half = await as(curator)
        .put('/api/v1/curation/cells/pinus-taeda/needles-per-fascicle', { value: { usual: [2.5] }, version: 1, reason: 'half a needle' })
        .expect(400);
      expect(half.body['invalid-params'].map((p: { name: string }) => p.name)).to.include('/body/value/usual/0');
      const outOfRange = await as(curator)
        .put('/api/v1/curation/cells/pinus-taeda/needles-per-fascicle', { value: { usual: [9] }, version: 1, reason: 'nine needles' })
        .expect(422);
      expect(outOfRange.body.detail).to.contain('9');
      expect(await storedCell('pinus-taeda', 'leaf-arrangement')).to.deep.equal({ value: now.value, version: now.version });
      expect(await auditCount()).to.equal(auditBefore);
    });

    it('answers wrong types and missing fields with 400 naming the field', async () => {
      const res = await as(curator).put(CELL, { value: 'unknown', version: 'one', reason: 'typed wrong' }).expect(400);
      expect(res.body['invalid-params'].map((p: { name: string }) => p.name).join(' ')).to.contain('version');
      const noReason = await as(curator).put(CELL, { value: 'unknown', version: 1 }).expect(400);
      expect(noReason.body['invalid-params'].map((p: { name: string }) => p.name).join(' ')).to.contain('reason');
      await as(curator).put('/api/v1/curation/cells/pinus-taeda/..%2F..%2Fetc', { value: 'unknown', version: 1, reason: 'path games' }).expect(400);
    });

    it('stores an SQL-looking reason as plain text', async () => {
      const now = (await as(curator).get(CELL).expect(200)).body;
      const reason = "x'); DROP TABLE cells; --";
      await as(curator).put(CELL, { value: now.value, version: now.version, reason }).expect(200);
      const audit = await as(curator).get('/api/v1/curation/audit').query({ entity: 'cell', limit: 1 }).expect(200);
      expect(audit.body.entries[0].reason).to.equal(reason);
      expect(await created.context.models.Cell.count()).to.be.greaterThan(100);
    });
  });

  describe('taxa, traits and values', () => {
    it('adds a taxon, refuses a duplicate, and retires it so the draft drops it', async () => {
      const body = {
        id: 'pinus-clausa',
        scientificName: 'Pinus clausa',
        authority: '(Chapm. ex Engelm.) Vasey ex Sarg.',
        family: 'Pinaceae',
        commonNames: ['sand pine'],
        reason: 'Florida study set',
      };
      const res = await as(curator).post('/api/v1/curation/taxa', body).expect(201);
      expect(res.body).to.deep.include({ id: 'pinus-clausa', retired: false });
      await as(curator).post('/api/v1/curation/taxa', body).expect(409);
      let draft = await as(curator).get('/api/v1/curation/draft/summary').expect(200);
      expect(draft.body.basedOn).to.equal(1);
      expect(draft.body.summary.taxaAdded).to.include('pinus-clausa');
      await as(curator).patch('/api/v1/curation/taxa/pinus-clausa', { retired: true, reason: 'not in this region after all' }).expect(200);
      draft = await as(curator).get('/api/v1/curation/draft/summary').expect(200);
      expect(draft.body.summary.taxaAdded).to.not.include('pinus-clausa');
      const audit = await as(curator).get('/api/v1/curation/audit').query({ entity: 'taxon', key: 'pinus-clausa' }).expect(200);
      expect(audit.body.entries.map((e: { action: string }) => e.action)).to.deep.equal(['retire', 'create']);
    });

    it('adds a state trait with values and a value to an existing trait; refuses an empty state trait', async () => {
      await as(curator)
        .post('/api/v1/curation/traits', {
          code: 'bark-lenticels',
          label: 'Lenticels on bark',
          part: 'bark',
          kind: 'state',
          season: 'any',
          ease: 1,
          errorRate: 0.1,
          values: [
            { code: 'conspicuous', label: 'Conspicuous' },
            { code: 'inconspicuous', label: 'Inconspicuous' },
          ],
          reason: 'young cherries and birches',
        })
        .expect(201);
      await as(curator).post('/api/v1/curation/traits/bark-texture/values', { code: 'lenticelled', label: 'Lenticelled', reason: 'cherry bark' }).expect(201);
      await as(curator).post('/api/v1/curation/traits/bark-texture/values', { code: 'lenticelled', label: 'Lenticelled again', reason: 'twice' }).expect(409);
      const empty = await as(curator)
        .post('/api/v1/curation/traits', {
          code: 'bark-empty',
          label: 'Nothing',
          part: 'bark',
          kind: 'state',
          season: 'any',
          ease: 1,
          errorRate: 0.1,
          reason: 'no values',
        })
        .expect(422);
      expect(empty.body.type).to.match(/\/problems\/matrix-invalid$/);
      expect(await created.context.models.Trait.findByPk('bark-empty')).to.equal(null);
    });

    it('refuses to retire a value that cells still use', async () => {
      const res = await as(curator).patch('/api/v1/curation/traits/foliage/values/needle', { retired: true, reason: 'try it' }).expect(422);
      expect(res.body.errors.length).to.be.greaterThan(0);
      expect((await created.context.models.TraitValue.findOne({ where: { traitCode: 'foliage', code: 'needle' } }))?.retired).to.equal(false);
    });

    it('filters the audit log by user and time', async () => {
      const mine = await as(curator).get('/api/v1/curation/audit').query({ user: curator.userId }).expect(200);
      expect(mine.body.entries.length).to.be.greaterThan(0);
      for (const entry of mine.body.entries) expect(entry.actor.userId).to.equal(curator.userId);
      const future = await as(curator)
        .get('/api/v1/curation/audit')
        .query({ since: new Date(Date.now() + 60_000).toISOString() })
        .expect(200);
      expect(future.body.entries).to.deep.equal([]);
      await as(curator).get('/api/v1/curation/audit').query({ since: 'yesterday' }).expect(400);
    });
  });

  describe('cell rules (each refused, nothing written)', () => {
    const BARK = '/api/v1/curation/cells/pinus-taeda/bark-texture';
    const COUNT = '/api/v1/curation/cells/pinus-taeda/needles-per-fascicle';
    const namesOf = (body: { 'invalid-params'?: Array<{ name: string }> }) => (body['invalid-params'] ?? []).map((param) => param.name);

    /** Writes `value` at the cell's current version and expects `status`; checks the cell and the audit are untouched. */
    const refused = async (url: string, value: unknown, status: number) => {
      const [taxonId, traitCode] = url.split('/').slice(-2) as [string, string];
      const now = (await as(curator).get(url).expect(200)).body;
      const auditBefore = await auditCount();
      const res = await as(curator).put(url, { value, version: now.version, reason: 'breaks a cell rule' }).expect(status);
      expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
      expect(await storedCell(taxonId, traitCode)).to.deep.equal({ value: now.value, version: now.version });
      expect(await auditCount()).to.equal(auditBefore);
      return res.body;
    };

    // the contract: "a numeric range min ≤ low ≤ high ≤ max in cm" (openapi.yaml, setCell)
    it('refuses a typical range whose low is above its high, naming low and high', async () => {
      const body = await refused(CELL, { min: 10, low: 24, high: 23, max: 25 }, 422);
      expect(body.type).to.match(/\/problems\/matrix-invalid$/);
      expect(namesOf(body).sort()).to.deep.equal(['/body/value/high', '/body/value/low']);
      expect(body.errors.map((error: { code: string }) => error.code)).to.deep.equal(['range-out-of-order']);
      const draft = (await as(curator).get('/api/v1/curation/draft/summary').expect(200)).body;
      expect(draft.errors).to.deep.equal([]);
      expect(draft.invalidCells).to.deep.equal([]);
    });

    it('refuses extremes inside the typical range, naming the fields out of order', async () => {
      expect(namesOf(await refused(CELL, { min: 13, low: 12, high: 23, max: 25 }, 422)).sort()).to.deep.equal(['/body/value/low', '/body/value/min']);
      expect(namesOf(await refused(CELL, { min: 10, low: 12, high: 23, max: 20 }, 422)).sort()).to.deep.equal(['/body/value/high', '/body/value/max']);
    });

    it('refuses a negative length, naming the field', async () => {
      expect(namesOf(await refused(CELL, { min: -1, low: 12, high: 23, max: 25 }, 422))).to.deep.equal(['/body/value/min']);
    });

    it('refuses a range on a state trait and coded values on a numeric trait', async () => {
      expect(namesOf(await refused(BARK, { min: 1, low: 2, high: 3, max: 4 }, 422))).to.deep.equal(['/body/value']);
      expect(namesOf(await refused(CELL, { usual: ['furrowed'] }, 422))).to.deep.equal(['/body/value']);
    });

    it("refuses a state value that is not one of the trait's codes, naming its frequency list", async () => {
      const body = await refused(BARK, { usual: ['furrowed'], occasional: ['corky'] }, 422);
      expect(namesOf(body)).to.deep.equal(['/body/value/occasional']);
      expect(body.detail).to.contain('corky');
    });

    it("refuses a frequency other than usual, occasional or rare (the contract's schema)", async () => {
      const body = await refused(BARK, { usual: ['furrowed'], often: ['scaly'] }, 400);
      expect(namesOf(body).some((name) => name.startsWith('/body/value'))).to.equal(true);
    });

    it('refuses the same value under two frequencies', async () => {
      expect(namesOf(await refused(BARK, { usual: ['furrowed'], rare: ['furrowed'] }, 422))).to.deep.equal(['/body/value/rare']);
    });

    // needles per bundle runs 1–5 (countRange in seeds/matrix/traits.json; pines have 1–5 needles per
    // fascicle, Flora of North America vol. 2, Pinus)
    it("refuses a count outside the trait's range and a count that is not a whole number", async () => {
      expect(namesOf(await refused(COUNT, { usual: [3], rare: [6] }, 422))).to.deep.equal(['/body/value/rare']);
      expect(namesOf(await refused(COUNT, { usual: ['three'] }, 422))).to.deep.equal(['/body/value/usual']);
    });

    it('keeps unknown and inapplicable exclusive: never mixed with coded values', async () => {
      expect(namesOf(await refused(BARK, { usual: ['furrowed'], rare: ['inapplicable'] }, 422))).to.deep.equal(['/body/value/rare']);
      expect(namesOf(await refused(BARK, { usual: ['unknown'] }, 422))).to.deep.equal(['/body/value/usual']);
      await refused(BARK, ['unknown', 'inapplicable'], 400);
      await refused(BARK, 'unknown and inapplicable', 400);
    });

    it('accepts unknown and inapplicable on any trait', async () => {
      for (const value of ['inapplicable', 'unknown'] as const) {
        const now = (await as(curator).get(BARK).expect(200)).body;
        await as(curator)
          .put(BARK, { value, version: now.version, reason: `mark it ${value}` })
          .expect(200);
      }
      const now = (await as(curator).get(BARK).expect(200)).body;
      await as(curator)
        .put(BARK, { value: { usual: ['furrowed'], occasional: ['scaly'] }, version: now.version, reason: 'furrowed, flaking into scales' })
        .expect(200);
    });

    it('refuses to publish while a cell breaks a rule (409 naming it); the draft says so, and fixing it lets it publish', async () => {
      // a cell saved before the rule was enforced: written straight into the database
      const now = (await as(curator).get(CELL).expect(200)).body;
      await created.context.models.Cell.update(
        { value: { min: 10, low: 24, high: 23, max: 25 } },
        { where: { taxonId: 'pinus-taeda', traitCode: 'needle-length' } },
      );
      const draft = (await as(curator).get('/api/v1/curation/draft/summary').expect(200)).body;
      expect(draft.publishable).to.equal(false);
      expect(draft.invalidCells).to.deep.equal([{ taxonId: 'pinus-taeda', traitCode: 'needle-length', problems: [draft.errors[0].message] }]);
      expect(draft.errors.map((error: { code: string }) => error.code)).to.deep.equal(['range-out-of-order']);
      const editionsBefore = await created.context.models.Edition.count();
      const res = await as(curator).post('/api/v1/editions', { title: 'With a bad cell', reason: 'should not publish' }).expect(409);
      expect(res.body.type).to.match(/\/problems\/invalid-cells$/);
      expect(res.body.cells.map((cell: { taxonId: string; traitCode: string }) => `${cell.taxonId}/${cell.traitCode}`)).to.deep.equal([
        'pinus-taeda/needle-length',
      ]);
      expect(namesOf(res.body)).to.deep.equal(['pinus-taeda/needle-length']);
      expect(await created.context.models.Edition.count()).to.equal(editionsBefore);
      await as(curator).put(CELL, { value: now.value, version: now.version, reason: 'range back in order' }).expect(200);
      const fixed = (await as(curator).get('/api/v1/curation/draft/summary').expect(200)).body;
      expect(fixed.invalidCells).to.deep.equal([]);
      expect(fixed.errors).to.deep.equal([]);
    });
  });

  describe('the working matrix for the grid', () => {
    it('lists every live taxon and trait with every cell and the version of each written cell', async () => {
      const res = await as(curator).get('/api/v1/curation/matrix').expect(200);
      expect(res.headers['cache-control']).to.match(/private/);
      const taxonCount = await created.context.models.Taxon.count({ where: { retired: false } });
      const traitCount = await created.context.models.Trait.count({ where: { retired: false } });
      expect(res.body.taxa).to.have.length(taxonCount);
      expect(res.body.traits).to.have.length(traitCount);
      const taeda = res.body.taxa.find((taxon: { id: string }) => taxon.id === 'pinus-taeda');
      const stored = await storedCell('pinus-taeda', 'needle-length');
      expect(taeda.cells['needle-length']).to.deep.equal(stored?.value);
      expect(taeda.versions['needle-length']).to.equal(stored?.version);
      expect(taeda.family).to.equal('Pinaceae');
      await request(created.app).get('/api/v1/curation/matrix').set('Authorization', `Bearer ${learner.token}`).expect(403);
    });

    it("packs each taxon's cells into one JSON text in the order of the traits, with the versions in that order", async () => {
      const full = (await as(curator).get('/api/v1/curation/matrix').expect(200)).body;
      const packed = (await as(curator).get('/api/v1/curation/matrix').query({ format: 'packed' }).expect(200)).body;
      const codes: string[] = packed.traits.map((trait: { code: string }) => trait.code);
      expect(codes).to.deep.equal(full.traits.map((trait: { code: string }) => trait.code));
      for (const [index, taxon] of packed.taxa.entries()) {
        const other = full.taxa[index];
        expect(taxon.id).to.equal(other.id);
        expect(taxon).to.not.have.property('cells');
        const cells: unknown[] = JSON.parse(taxon.packed);
        expect(cells).to.have.length(codes.length);
        codes.forEach((code, at) => {
          expect(cells[at], `${taxon.id} × ${code}`).to.deep.equal(other.cells[code] ?? 'unknown');
          expect(taxon.versions[at]).to.equal(other.versions[code] ?? 0);
        });
      }
      await as(curator).get('/api/v1/curation/matrix').query({ format: 'columns' }).expect(400);
    });
  });

  describe('publishing', () => {
    it('publishes the draft as edition 2; identify, lookups and the bundle then serve it', async () => {
      const bundleBefore = await request(created.app).get('/api/v1/editions/current/bundle').expect(200);
      await as(learner).post('/api/v1/editions', { title: 'not allowed', reason: 'learners cannot publish' }).expect(403);
      const res = await as(curator).post('/api/v1/editions', { title: 'Second edition', reason: 'needle lengths rechecked' }).expect(201);
      expect(res.body.number).to.equal(2);
      expect(res.headers['location']).to.equal('/api/v1/editions/2');
      expect(res.body.summary.cellsChanged).to.be.greaterThan(0);
      expect(res.body.summary.traitsAdded).to.include('bark-lenticels');

      const list = await request(created.app).get('/api/v1/editions').expect(200);
      expect(list.body.current).to.equal(2);
      const page = await request(created.app).get('/api/v1/taxa/pinus-taeda').expect(200);
      expect(page.body.edition.id).to.equal(2);
      const bundleAfter = await request(created.app).get('/api/v1/editions/current/bundle').set('If-None-Match', bundleBefore.headers['etag']).expect(200);
      expect(bundleAfter.headers['etag']).to.not.equal(bundleBefore.headers['etag']);
      expect(bundleAfter.headers['x-sylvasift-edition']).to.equal('2');
      const sift = await request(created.app)
        .post('/api/v1/identify')
        .set('Authorization', `Bearer ${learner.token}`)
        .send({ observations: [{ trait: 'foliage', values: ['needle'] }] })
        .expect(200);
      expect(sift.body.edition.id).to.equal(2);
      const audit = await as(curator).get('/api/v1/curation/audit').query({ entity: 'edition' }).expect(200);
      expect(audit.body.entries[0]).to.deep.include({ entityKey: '2', action: 'publish', reason: 'needle lengths rechecked' });
    });

    it('refuses to publish a draft that changes nothing (409 with the reason) and creates no edition', async () => {
      const draft = await as(curator).get('/api/v1/curation/draft/summary').expect(200);
      expect(draft.body).to.include({ basedOn: 2, publishable: false });
      const res = await as(curator).post('/api/v1/editions', { title: 'Nothing new', reason: 'publishing twice' }).expect(409);
      expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
      expect(res.body).to.include({ type: '/api/problems/conflict', reason: 'no-changes', basedOn: 2 });
      expect(res.body.detail).to.include('edition 2');
      expect(await created.context.models.Edition.count()).to.equal(2);
      const list = await request(created.app).get('/api/v1/editions').expect(200);
      expect(list.body.current).to.equal(2);
      const audit = await as(curator).get('/api/v1/curation/audit').query({ entity: 'edition' }).expect(200);
      expect(audit.body.entries.filter((e: { action: string }) => e.action === 'publish')).to.have.length(1);
    });
  });
});
