import { expect } from 'chai';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { createPartnerKey, signUpAndSignIn } from './support/accounts';
import { assertContractKept, startTestApp } from './support/test-app';

interface CandidateBody {
  taxon: { id: string };
  probability: number;
  conflicts: number;
  reasons: Array<{ trait: string; status: string }>;
}

// Loblolly pine: needles in fascicles of 3, (10–)12–18(–22) cm long (Flora of North America vol. 2,
// from memory); 6 in = 15.24 cm exactly (NIST SP 811, Appendix B: 1 in = 2.54 cm).
const LOBLOLLY_SIGHTING = {
  observations: [
    { trait: 'foliage', values: ['needle'] },
    { trait: 'needles-per-fascicle', values: [3] },
    { trait: 'needle-length', value: 6, unit: 'in' },
  ],
  season: 'leaf-on',
  leeway: 2,
  limit: 10,
};

describe('api: POST /api/v1/identify', () => {
  let created: CreatedApp;
  let userToken: string;
  let identifyKey: string;
  let lookupOnlyKey: string;

  before(async () => {
    created = await startTestApp();
    const user = await signUpAndSignIn(created, 'learner');
    userToken = user.token;
    identifyKey = (await createPartnerKey(created, userToken, ['identify'])).key;
    lookupOnlyKey = (await createPartnerKey(created, userToken, ['lookup'], 'Lookup only')).key;
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  const post = (body: unknown, token: string | null = identifyKey) => {
    const call = request(created.app).post('/api/v1/identify');
    return token ? call.set('Authorization', `Bearer ${token}`).send(body as object) : call.send(body as object);
  };

  describe('who may call it', () => {
    it('turns away anonymous callers with 401 and a bearer challenge', async () => {
      const res = await post(LOBLOLLY_SIGHTING, null).expect(401);
      expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
      expect(res.headers['www-authenticate']).to.match(/^Bearer/);
    });

    it('turns away a partner key without the identify scope with 403', async () => {
      const res = await post(LOBLOLLY_SIGHTING, lookupOnlyKey).expect(403);
      expect(res.body.type).to.match(/\/problems\/forbidden$/);
    });

    it('answers a partner key with the identify scope and any signed-in user', async () => {
      await post(LOBLOLLY_SIGHTING, identifyKey).expect(200);
      await post(LOBLOLLY_SIGHTING, userToken).expect(200);
    });
  });

  describe('the answer', () => {
    it('puts loblolly pine on top of the Shortlist for 3 needles per bundle, 6 inches long', async () => {
      const res = await post(LOBLOLLY_SIGHTING).expect(200);
      expect(res.headers['cache-control']).to.equal('no-store');
      expect(res.body.edition).to.deep.include({ id: 1 });
      expect(res.body.edition.publishedAt).to.match(/^\d{4}-\d\d-\d\dT/);
      const top = res.body.candidates[0] as CandidateBody;
      expect(top.taxon.id).to.equal('pinus-taeda');
      expect(top.conflicts).to.equal(0);
      expect(top.reasons.find((r) => r.trait === 'needles-per-fascicle')?.status).to.equal('matched');
      const everyone = [...res.body.candidates, ...res.body.ruledOut] as CandidateBody[];
      const total = everyone.reduce((sum, c) => sum + c.probability, 0);
      expect(total).to.be.at.most(1 + 1e-9);
      for (const c of everyone) expect(Number.isFinite(c.probability)).to.be.true;
    });

    // Longleaf pine: needles 20–45 cm (Flora of North America vol. 2, from memory), far beyond 15 cm.
    it('suggests what to Look at next, leaving out traits already seen and leaf traits in leaf-off', async () => {
      const res = await post(LOBLOLLY_SIGHTING).expect(200);
      const suggested = res.body.suggestions as Array<{ trait: string; expectedGain: number; preview: unknown[] }>;
      expect(suggested.length).to.be.greaterThan(0);
      for (const s of suggested) {
        expect(['foliage', 'needles-per-fascicle', 'needle-length']).to.not.include(s.trait);
        expect(s.expectedGain).to.be.at.least(0);
        expect(s.preview.length).to.be.greaterThan(0);
      }
      // Every trait the edition marks leaf-on, as the API itself lists them.
      const traits = await request(created.app).get('/api/v1/traits').expect(200);
      const leafOn = new Set((traits.body.traits as Array<{ code: string; season: string }>).filter((t) => t.season === 'leaf-on').map((t) => t.code));
      expect(leafOn.size, 'leaf-on traits in the edition').to.be.greaterThan(5);
      const broadleaf = { observations: [{ trait: 'foliage', values: ['broad'] }] };
      // In leaf the same sighting is told to look at leaves, so the leaf-off check below has something to leave out.
      const summer = await post({ ...broadleaf, season: 'leaf-on' }).expect(200);
      expect(
        (summer.body.suggestions as Array<{ trait: string }>).some((s) => leafOn.has(s.trait)),
        'a leaf-on suggestion in leaf',
      ).to.be.true;
      const winter = await post({ ...broadleaf, season: 'leaf-off' }).expect(200);
      const winterTraits = (winter.body.suggestions as Array<{ trait: string }>).map((s) => s.trait);
      expect(winterTraits, 'suggestions in leaf-off').to.not.be.empty;
      for (const trait of winterTraits) expect(leafOn.has(trait), `${trait} needs leaves`).to.be.false;
    });

    // common practice, no source: a trunk seen alone shows its bark and the tree's form, a winter twig only the twig
    it('asks only about what is in hand, and leaves autumn colour out in July', async () => {
      const traits = await request(created.app).get('/api/v1/traits').expect(200);
      const partOf = new Map((traits.body.traits as Array<{ code: string; part: string }>).map((t) => [t.code, t.part]));
      const bark = await post({ observations: [], inHand: 'bark-only' }).expect(200);
      const barkTraits = (bark.body.suggestions as Array<{ trait: string }>).map((s) => s.trait);
      expect(barkTraits, 'bark-only suggestions').to.not.be.empty;
      for (const trait of barkTraits) expect(['bark', 'form'], trait).to.include(partOf.get(trait));
      const twig = await post({ observations: [{ trait: 'foliage', values: ['broad'] }], inHand: 'winter-twig', season: 'leaf-off' }).expect(200);
      const twigTraits = (twig.body.suggestions as Array<{ trait: string }>).map((s) => s.trait);
      expect(twigTraits, 'winter-twig suggestions').to.not.be.empty;
      for (const trait of twigTraits) expect(partOf.get(trait), trait).to.equal('twig');
      // a smooth-barked, simple, unlobed broadleaf: in October its autumn colour is worth a look
      const smooth = [
        { trait: 'foliage', values: ['broad'] },
        { trait: 'leaf-lobing', values: ['unlobed'] },
        { trait: 'leaf-type', values: ['simple'] },
        { trait: 'bark-texture', values: ['smooth'] },
      ];
      const october = await post({ observations: smooth, month: 10 }).expect(200);
      const july = await post({ observations: smooth, month: 7 }).expect(200);
      expect((october.body.suggestions as Array<{ trait: string }>).map((s) => s.trait)).to.include('fall-color');
      expect((july.body.suggestions as Array<{ trait: string }>).map((s) => s.trait)).to.not.include('fall-color');
    });

    it('ranks a taxon whose needles are far longer below the loblolly', async () => {
      const res = await post(LOBLOLLY_SIGHTING).expect(200);
      const ids = [...res.body.candidates, ...res.body.ruledOut].map((c: CandidateBody) => c.taxon.id);
      expect(ids.indexOf('pinus-palustris')).to.be.greaterThan(ids.indexOf('pinus-taeda'));
    });

    it('gives the same answer for the same length in inches, centimetres and millimetres', async () => {
      const withUnit = (value: number, unit: string) => ({
        ...LOBLOLLY_SIGHTING,
        observations: [...LOBLOLLY_SIGHTING.observations.slice(0, 2), { trait: 'needle-length', value, unit }],
      });
      const inches = await post(withUnit(6, 'in')).expect(200);
      const centimetres = await post(withUnit(15.24, 'cm')).expect(200);
      const millimetres = await post(withUnit(152.4, 'mm')).expect(200);
      const summary = (body: { candidates: CandidateBody[] }) => body.candidates.map((c) => [c.taxon.id, c.probability.toFixed(9)]);
      expect(summary(centimetres.body)).to.deep.equal(summary(inches.body));
      expect(summary(millimetres.body)).to.deep.equal(summary(inches.body));
    });

    it('cuts the Shortlist to the limit but reports how many there are in all', async () => {
      const res = await post({ observations: [{ trait: 'foliage', values: ['broad'] }], limit: 3 }).expect(200);
      expect(res.body.candidates).to.have.length(3);
      expect(res.body.totalCandidates).to.be.greaterThan(3);
    });

    it('moves taxa with more conflicts than the leeway under Ruled out', async () => {
      const res = await post({
        observations: [
          { trait: 'foliage', values: ['needle'] },
          { trait: 'needles-per-fascicle', values: [5] },
        ],
        leeway: 0,
      }).expect(200);
      expect(res.body.candidates.map((c: CandidateBody) => c.taxon.id)).to.include('pinus-strobus');
      const ruledOut = res.body.ruledOut as CandidateBody[];
      expect(ruledOut.length).to.be.greaterThan(0);
      for (const c of ruledOut) expect(c.conflicts).to.be.greaterThan(0);
      expect(ruledOut.map((c) => c.taxon.id)).to.include('pinus-taeda');
    });

    it('compiles the current edition once and reuses it for every request', async () => {
      const first = await created.context.editions.current();
      await post(LOBLOLLY_SIGHTING).expect(200);
      await post(LOBLOLLY_SIGHTING).expect(200);
      const second = await created.context.editions.current();
      expect(second).to.equal(first);
      expect(second.compiled).to.equal(first.compiled);
    });
  });

  describe('bad input is a 400 problem pointing at the offending item', () => {
    const expectInvalid = async (body: unknown, pointer: RegExp) => {
      const res = await post(body).expect(400);
      expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
      expect(res.body.type).to.match(/\/problems\/invalid-input$/);
      expect(res.body.detail).to.be.a('string').and.not.equal('');
      const names = (res.body['invalid-params'] as Array<{ name: string }>).map((p) => p.name);
      expect(
        names.some((name) => pointer.test(name)),
        names.join(', '),
      ).to.be.true;
      return res;
    };

    it('an unknown trait code', async () => {
      const res = await expectInvalid({ observations: [{ trait: 'needle-count', values: [3] }] }, /^\/body\/observations\/0\/trait$/);
      expect(res.body.detail).to.contain('needle-count');
    });

    it('an unknown value code', async () => {
      await expectInvalid(
        {
          observations: [
            { trait: 'foliage', values: ['needle'] },
            { trait: 'foliage-x', values: ['x'] },
          ],
        },
        /^\/body\/observations\/1\/trait$/,
      );
      await expectInvalid({ observations: [{ trait: 'leaf-arrangement', values: ['spiral-ish'] }] }, /^\/body\/observations\/0\/values$/);
    });

    it('a measurement sent to a state trait and a value list sent to a numeric trait', async () => {
      await expectInvalid({ observations: [{ trait: 'leaf-arrangement', value: 3 }] }, /^\/body\/observations\/0/);
      await expectInvalid({ observations: [{ trait: 'needle-length', values: [6] }] }, /^\/body\/observations\/0/);
    });

    it('a unit that does not fit', async () => {
      await expectInvalid({ observations: [{ trait: 'needle-length', value: 6, unit: 'kg' }] }, /^\/body\/observations\/0\/unit$/);
      await expectInvalid({ observations: [{ trait: 'foliage', values: ['needle'], unit: 'cm' }] }, /^\/body\/observations\/0/);
    });

    it('wrong types, unknown fields and more than 100 observations', async () => {
      await expectInvalid({ observations: 'needles' }, /observations/);
      await expectInvalid({ observations: [{ trait: 42, values: [3] }] }, /observations\/0\/trait/);
      await expectInvalid({ observations: [], leeway: -1 }, /leeway/);
      await expectInvalid({ observations: [], favourite: 'pine' }, /favourite|body/);
      await expectInvalid({ observations: [], inHand: 'whole-forest' }, /inHand/);
      await expectInvalid({ observations: [], month: 13 }, /month/);
      await expectInvalid({ observations: [], month: 0 }, /month/);
      const many = Array.from({ length: 101 }, () => ({ trait: 'foliage', values: ['needle'] }));
      await expectInvalid({ observations: many }, /observations/);
    });

    it('a body larger than the endpoint accepts is 413', async () => {
      const huge = { observations: [{ trait: 'foliage', values: ['x'.repeat(300 * 1024)] }] };
      const res = await post(huge).expect(413);
      expect(res.body.type).to.match(/\/problems\/payload-too-large$/);
    });
  });
});
