import { expect } from 'chai';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { createPartnerKey, signUpAndSignIn, type SignedInUser } from './support/accounts';
import { assertContractKept, startTestApp } from './support/test-app';

const COMPARE = '/api/v1/compare';

interface ComparedTrait {
  trait: string;
  verdict: string;
  strength?: string;
  text: string;
  taxa: Array<{ id: string; cell: unknown; coded: string }>;
}

interface DiagnosticTrait {
  trait: string;
  separates: string[];
  text: string;
  coded: string;
  strength: string;
  lookAlikes: Array<{ id: string; coded: string; separated: boolean; strength?: string }>;
}

describe('api: Side by side and the species-page diagnosis', () => {
  let created: CreatedApp;
  let learner: SignedInUser;

  before(async () => {
    created = await startTestApp();
    learner = await signUpAndSignIn(created, 'learner');
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  const sideBySide = (taxa: unknown) => request(created.app).post(COMPARE).send({ taxa });
  const names = (res: request.Response) => (res.body['invalid-params'] as Array<{ name: string; reason: string }>).map((p) => p.name);

  describe('POST /compare', () => {
    it('sorts every trait into separating, overlapping, same or not coded, with each taxon coded in words', async () => {
      const res = await sideBySide(['pinus-taeda', 'pinus-strobus']).expect(200);
      expect(res.headers['cache-control']).to.equal('no-store');
      expect(res.body.taxa.map((t: { id: string }) => t.id)).to.deep.equal(['pinus-taeda', 'pinus-strobus']);
      const lists = ['separating', 'overlapping', 'same', 'notCoded'] as const;
      const verdicts = { separating: 'separates', overlapping: 'overlaps', same: 'same', notCoded: 'not-coded' };
      for (const list of lists) for (const entry of res.body[list] as ComparedTrait[]) expect(entry.verdict, entry.trait).to.equal(verdicts[list]);
      const every = lists.flatMap((list) => (res.body[list] as ComparedTrait[]).map((entry) => entry.trait));
      const traits = (await request(created.app).get('/api/v1/traits').expect(200)).body.traits.map((t: { code: string }) => t.code);
      expect([...every].sort()).to.deep.equal([...traits].sort());

      // Flora of North America vol. 2 (from memory): loblolly pine bears needles in bundles of 3 (sometimes 2),
      // eastern white pine in bundles of 5, so bundle size alone tells them apart
      const bundles = (res.body.separating as ComparedTrait[]).find((entry) => entry.trait === 'needles-per-fascicle');
      expect(bundles, 'needles-per-fascicle separates loblolly from eastern white pine').to.not.equal(undefined);
      expect(bundles!.taxa.map((t) => t.id)).to.deep.equal(['pinus-taeda', 'pinus-strobus']);
      expect(bundles!.taxa[0]!.cell).to.deep.equal({ usual: [3], occasional: [2] });
      expect(bundles!.taxa[0]!.coded).to.match(/^usually .*3.*, occasionally .*2/i);
      expect(bundles!.taxa[1]!.coded).to.match(/^usually .*5/i);
      // both are needle-leaved evergreens: Flora of North America vol. 2 (from memory)
      const same = (res.body.same as ComparedTrait[]).map((entry) => entry.trait);
      expect(same).to.include.members(['foliage', 'leaf-persistence']);
      const numeric = [...(res.body.separating as ComparedTrait[]), ...(res.body.overlapping as ComparedTrait[])].find(
        (entry) => entry.trait === 'needle-length',
      );
      expect(numeric!.taxa[0]!.coded).to.match(/cm/);
    });

    it('keeps the order the taxa were named in, and compares up to four', async () => {
      const ids = ['pinus-strobus', 'pinus-echinata', 'pinus-taeda', 'pinus-virginiana'];
      const res = await sideBySide(ids).expect(200);
      expect(res.body.taxa.map((t: { id: string }) => t.id)).to.deep.equal(ids);
      for (const entry of res.body.overlapping as ComparedTrait[]) expect(entry.taxa.map((t) => t.id)).to.deep.equal(ids);
    });

    it('answers 400 naming the offending item: unknown, repeated, malformed, too few or too many', async () => {
      const unknown = await sideBySide(['pinus-taeda', 'pinus-imaginaria']).expect(400);
      expect(names(unknown)).to.deep.equal(['/body/taxa/1']);
      expect(unknown.body.detail).to.contain('pinus-imaginaria');
      const repeated = await sideBySide(['pinus-taeda', 'pinus-echinata', 'pinus-taeda']).expect(400);
      expect(names(repeated)).to.deep.equal(['/body/taxa/2']);
      const malformed = await sideBySide(['pinus-taeda', '../../etc/passwd']).expect(400);
      expect(names(malformed).join(' ')).to.contain('/body/taxa/1');
      const one = await sideBySide(['pinus-taeda']).expect(400);
      expect(names(one).join(' ')).to.contain('/body/taxa');
      await sideBySide(['pinus-taeda', 'pinus-echinata', 'pinus-strobus', 'pinus-virginiana', 'pinus-rigida']).expect(400);
      await request(created.app).post(COMPARE).send({ taxa: 'pinus-taeda' }).expect(400);
    });

    it('is open to anyone and signed-in users; a partner key needs the lookup scope', async () => {
      await request(created.app)
        .post(COMPARE)
        .set('Authorization', `Bearer ${learner.token}`)
        .send({ taxa: ['pinus-taeda', 'pinus-echinata'] })
        .expect(200);
      const lookupKey = await createPartnerKey(created, learner.token, ['lookup']);
      const identifyKey = await createPartnerKey(created, learner.token, ['identify']);
      await request(created.app)
        .post(COMPARE)
        .set('Authorization', `Bearer ${lookupKey.key}`)
        .send({ taxa: ['pinus-taeda', 'pinus-echinata'] })
        .expect(200);
      const refused = await request(created.app)
        .post(COMPARE)
        .set('Authorization', `Bearer ${identifyKey.key}`)
        .send({ taxa: ['pinus-taeda', 'pinus-echinata'] })
        .expect(403);
      expect(refused.body.type).to.match(/\/problems\/forbidden$/);
    });
  });

  describe('GET /taxa/{id} diagnostic', () => {
    it('gives traits that tell the taxon from its look-alikes, with how each look-alike is coded', async () => {
      const res = await request(created.app).get('/api/v1/taxa/acer-rubrum').expect(200);
      const lookAlikeIds = (res.body.lookAlikes as Array<{ id: string }>).map((t) => t.id);
      expect(lookAlikeIds.length).to.be.greaterThan(0);
      const diagnostic = res.body.diagnostic as { traits: DiagnosticTrait[]; unseparated: string[] };
      expect(diagnostic.traits.length).to.be.greaterThan(0);
      expect(diagnostic.traits.length).to.be.at.most(lookAlikeIds.length);
      // every look-alike is either told apart by one of the traits or listed as unseparated, never both
      const toldApart = diagnostic.traits.flatMap((t) => t.separates);
      expect([...toldApart, ...diagnostic.unseparated].sort()).to.deep.equal([...lookAlikeIds].sort());
      for (const trait of diagnostic.traits) {
        expect(trait.lookAlikes.map((l) => l.id)).to.deep.equal(lookAlikeIds);
        for (const id of trait.separates) {
          const other = trait.lookAlikes.find((l) => l.id === id)!;
          expect(other.separated, `${trait.trait} separates ${id}`).to.equal(true);
          expect(other.strength, `${trait.trait} grades ${id}`).to.be.oneOf(['reliable', 'usual']);
          expect(other.coded).to.not.equal(trait.coded);
        }
        const allReliable = trait.separates.every((id) => trait.lookAlikes.find((l) => l.id === id)!.strength === 'reliable');
        expect(trait.strength, trait.trait).to.equal(allReliable ? 'reliable' : 'usual');
        for (const other of trait.lookAlikes) if (!other.separated) expect(other).to.not.have.property('strength');
      }
      expect(toldApart).to.include('acer-saccharum');
      // red maple leaves are serrate, sugar maple's entire between the lobes: common practice, no source
      const maples = await sideBySide(['acer-rubrum', 'acer-saccharum']).expect(200);
      const margin = (maples.body.separating as ComparedTrait[]).find((entry) => entry.trait === 'leaf-margin');
      expect(margin, 'leaf-margin separates red from sugar maple').to.not.equal(undefined);
      expect(margin!.strength).to.equal('reliable');
      expect(margin!.taxa[0]!.coded.toLowerCase()).to.contain('serrate');
    });

    it('is null for a taxon with no look-alikes in the edition', async () => {
      const res = await request(created.app).get('/api/v1/taxa/pinus-strobus').expect(200);
      expect(res.body.lookAlikes).to.deep.equal([]);
      expect(res.body).to.have.property('diagnostic', null);
    });
  });
});
