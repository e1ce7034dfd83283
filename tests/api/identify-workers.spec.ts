import { expect } from 'chai';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { ConfigError, defaultIdentifyWorkers, loadConfig } from '../../api/src/config';
import { LoadedEdition } from '../../api/src/editions/edition-catalog';
import { IdentifyBusy, IdentifyPool, workerExecArgv } from '../../api/src/identify/identify-pool';
import { identifyAnswer, type IdentifyRequest } from '../../api/src/identify/identify-answer';
import { loadReferenceMatrix } from '../../seeds/load-matrix';
import { createPartnerKey, signUpAndSignIn, type SignedInUser } from './support/accounts';
import { assertContractKept, startTestApp } from './support/test-app';

// Loblolly pine: needles in fascicles of 3, (10–)12–18(–22) cm long (Flora of North America vol. 2,
// from memory); 6 in = 15.24 cm exactly (NIST SP 811, Appendix B: 1 in = 2.54 cm).
const LOBLOLLY: IdentifyRequest = {
  observations: [
    { trait: 'foliage', values: ['needle'] },
    { trait: 'needles-per-fascicle', values: [3] },
    { trait: 'needle-length', value: 6, unit: 'in' },
    { trait: 'leaf-arrangement', values: ['alternate'] },
    { trait: 'bark-texture', values: ['furrowed', 'plated'] },
  ],
  season: 'leaf-on',
  leeway: 2,
  limit: 10,
};

/** Sifts of different shapes: broadleaf, winter, millimetres, no leeway, a short list, nothing seen. */
const SIFTS: IdentifyRequest[] = [
  LOBLOLLY,
  {
    observations: [
      { trait: 'foliage', values: ['broad'] },
      { trait: 'leaf-arrangement', values: ['opposite'] },
      { trait: 'leaf-type', values: ['pinnately-compound'] },
    ],
  },
  { observations: [{ trait: 'leaf-arrangement', values: ['opposite'] }], season: 'leaf-off', limit: 3 },
  { observations: [{ trait: 'needle-length', value: 25, unit: 'mm' }], leeway: 0 },
  { observations: [], limit: 5 },
];

const bodyOf = (answer: Uint8Array) => JSON.parse(Buffer.from(answer).toString('utf8')) as Record<string, unknown>;

describe('api: identify on worker threads', function () {
  // worker threads load the engine through tsx on first use
  this.timeout(60_000);
  let inline: CreatedApp;
  let pooled: CreatedApp;
  let inlineKey: string;
  let pooledKey: string;
  let curator: SignedInUser;

  before(async () => {
    [inline, pooled] = await Promise.all([startTestApp(), startTestApp({ IDENTIFY_WORKERS: '2' })]);
    inlineKey = (await createPartnerKey(inline, (await signUpAndSignIn(inline, 'learner')).token, ['identify'])).key;
    pooledKey = (await createPartnerKey(pooled, (await signUpAndSignIn(pooled, 'learner')).token, ['identify'])).key;
    curator = await signUpAndSignIn(pooled, 'curator');
  });
  afterEach(() => {
    assertContractKept(inline);
    assertContractKept(pooled);
  });
  after(async () => {
    await inline.close();
    await pooled.close();
  });

  const post = (created: CreatedApp, key: string, body: unknown) =>
    request(created.app)
      .post('/api/v1/identify')
      .set('Authorization', `Bearer ${key}`)
      .send(body as object);

  it('answers every sift exactly as the request thread does, edition stamp aside', async () => {
    for (const sift of SIFTS) {
      const [a, b] = await Promise.all([post(inline, inlineKey, sift).expect(200), post(pooled, pooledKey, sift).expect(200)]);
      expect(b.headers['content-type']).to.equal('application/json; charset=utf-8');
      expect(b.headers['cache-control']).to.equal('no-store');
      // the two apps seeded their edition 1 at different moments
      const { edition: editionA, ...restA } = a.body as { edition: { id: number } };
      const { edition: editionB, ...restB } = b.body as { edition: { id: number } };
      expect(editionB.id).to.equal(editionA.id);
      expect(restB, JSON.stringify(sift)).to.deep.equal(restA);
    }
  });

  it('keeps answers apart when many calls are in flight at once', async () => {
    const calls = Array.from({ length: 24 }, (_, i) => SIFTS[i % SIFTS.length]);
    const expected = await Promise.all(SIFTS.map((sift) => post(inline, inlineKey, sift).expect(200)));
    const answers = await Promise.all(calls.map((sift) => post(pooled, pooledKey, sift).expect(200)));
    answers.forEach((answer, i) => {
      const { edition: _a, ...got } = answer.body as Record<string, unknown>;
      const { edition: _b, ...want } = expected[i % SIFTS.length].body as Record<string, unknown>;
      expect(got, `call ${i}`).to.deep.equal(want);
    });
  });

  it('sends the answer as the workers wrote it, with its length and no entity tag, when responses are not checked', async () => {
    const quiet = await startTestApp({ IDENTIFY_WORKERS: '1', VALIDATE_RESPONSES: 'false' });
    try {
      const key = (await createPartnerKey(quiet, (await signUpAndSignIn(quiet, 'learner')).token, ['identify'])).key;
      const [a, b] = await Promise.all([post(inline, inlineKey, LOBLOLLY).expect(200), post(quiet, key, LOBLOLLY).expect(200)]);
      expect(b.headers['content-type']).to.equal('application/json; charset=utf-8');
      expect(Number(b.headers['content-length'])).to.equal(Buffer.byteLength(JSON.stringify(b.body)));
      // an answer to a POST is not reused by caches (RFC 9110 §9.3.3: only with explicit freshness and a matching Content-Location), so no validator is computed
      expect(b.headers['etag']).to.equal(undefined);
      const { edition: _a, ...want } = a.body as Record<string, unknown>;
      const { edition: _b, ...got } = b.body as Record<string, unknown>;
      expect(got).to.deep.equal(want);
    } finally {
      await quiet.close();
    }
  });

  it('answers invalid observations with the same 400 problem, pointing at the observation', async () => {
    const bad = {
      observations: [
        { trait: 'foliage', values: ['needle'] },
        { trait: 'needle-length', value: 6, unit: 'furlong' },
      ],
    };
    const [a, b] = await Promise.all([post(inline, inlineKey, bad).expect(400), post(pooled, pooledKey, bad).expect(400)]);
    expect(b.headers['content-type']).to.match(/^application\/problem\+json/);
    expect(b.body['invalid-params']).to.deep.equal(a.body['invalid-params']);
    expect(b.body.detail).to.equal(a.body.detail);
    expect(JSON.stringify(b.body['invalid-params'])).to.contain('/body/observations/1');
  });

  it('serves a newly published edition from the workers, with its new content', async () => {
    const cell = '/api/v1/curation/cells/pinus-taeda/needle-length';
    const as = (path: string) => request(pooled.app).get(path).set('Authorization', `Bearer ${curator.token}`);
    const before = await post(pooled, pooledKey, LOBLOLLY).expect(200);
    const reasonBefore = (before.body.candidates as Array<{ taxon: { id: string }; reasons: Array<{ trait: string; status: string }> }>)
      .find((c) => c.taxon.id === 'pinus-taeda')
      ?.reasons.find((r) => r.trait === 'needle-length');
    expect(reasonBefore?.status).to.equal('matched');

    // recode loblolly's needles as 5–9 cm, so a 15 cm needle no longer fits (a test edit, not a fact)
    const current = await as(cell).expect(200);
    await request(pooled.app)
      .put(cell)
      .set('Authorization', `Bearer ${curator.token}`)
      .send({ value: { min: 4, low: 5, high: 9, max: 10 }, version: current.body.version, reason: 'worker test edition' })
      .expect(200);
    await request(pooled.app)
      .post('/api/v1/editions')
      .set('Authorization', `Bearer ${curator.token}`)
      .send({ title: 'Worker test', reason: 'worker test edition' })
      .expect(201);

    const after = await post(pooled, pooledKey, LOBLOLLY).expect(200);
    expect(after.body.edition.id).to.equal(2);
    const everyone = [...(after.body.candidates as unknown[]), ...(after.body.ruledOut as unknown[])] as Array<{
      taxon: { id: string };
      reasons: Array<{ trait: string; status: string }>;
    }>;
    const reasonAfter = everyone.find((c) => c.taxon.id === 'pinus-taeda')?.reasons.find((r) => r.trait === 'needle-length');
    expect(reasonAfter?.status).to.not.equal('matched');
  });
});

describe('api: identify worker configuration', () => {
  it('starts one worker per core beyond the first, at most four, and none on one core', () => {
    expect([1, 2, 3, 5, 16].map((cores) => defaultIdentifyWorkers(cores))).to.deep.equal([0, 1, 2, 4, 4]);
    expect(loadConfig({ NODE_ENV: 'production', SMTP_URL: 'smtp://mail.invalid' }).identify.workers).to.equal(defaultIdentifyWorkers());
    expect(loadConfig({ NODE_ENV: 'test' }).identify.workers).to.equal(0);
    expect(loadConfig({ NODE_ENV: 'test', IDENTIFY_WORKERS: '3' }).identify.workers).to.equal(3);
    // an empty value, as an unfilled line in an env file gives, means the default
    expect(loadConfig({ NODE_ENV: 'test', IDENTIFY_WORKERS: '' }).identify.workers).to.equal(0);
  });

  it('passes tsx on to workers run from source exactly once, and nothing extra to the built worker', () => {
    const loader = ['--require', '/app/node_modules/tsx/dist/preflight.cjs', '--import', 'file:///app/node_modules/tsx/dist/loader.mjs'];
    expect(workerExecArgv('/app/api/src/identify/identify-worker.ts', loader)).to.deep.equal(loader);
    expect(workerExecArgv('/app/api/src/identify/identify-worker.ts', ['--import', 'tsx'])).to.deep.equal(['--import', 'tsx']);
    expect(workerExecArgv('/app/api/src/identify/identify-worker.ts', ['--enable-source-maps'])).to.deep.equal(['--enable-source-maps', '--import', 'tsx']);
    expect(workerExecArgv('/app/dist/api/identify-worker.js', ['--enable-source-maps'])).to.deep.equal(['--enable-source-maps']);
  });

  it('rejects a worker count that is not a whole number from 0 to 64', () => {
    for (const bad of ['-1', 'two', '1.5', '65', '0x2']) {
      expect(() => loadConfig({ NODE_ENV: 'test', IDENTIFY_WORKERS: bad }), bad).to.throw(ConfigError, /IDENTIFY_WORKERS must be an integer 0–64/);
    }
  });
});

describe('api: the identify pool', function () {
  this.timeout(60_000);
  const document = loadReferenceMatrix();
  const publishedAt = new Date('2026-11-30T12:00:00Z');
  const first = new LoadedEdition({ number: 1, title: 'one', publishedAt, publishedBy: null, summary: {} as never, document });
  // the same number brought back with other content, as a restore can: one taxon fewer
  const withoutLoblolly = { ...document, taxa: document.taxa.filter((t) => t.id !== 'pinus-taeda') };
  const restored = new LoadedEdition({ number: 1, title: 'one', publishedAt, publishedBy: null, summary: {} as never, document: withoutLoblolly });

  it('sends each worker an edition once and tells editions apart by load, not by number', async () => {
    const pool = new IdentifyPool(1);
    try {
      for (const edition of [first, restored, first]) {
        const outcome = await pool.identify(edition, LOBLOLLY);
        const local = identifyAnswer(edition, LOBLOLLY);
        expect(outcome.kind).to.equal('answer');
        if (outcome.kind !== 'answer' || local.kind !== 'answer') throw new Error('expected answers');
        expect(bodyOf(outcome.body)).to.deep.equal(bodyOf(local.body));
        const ids = (bodyOf(outcome.body).candidates as Array<{ taxon: { id: string } }>).map((c) => c.taxon.id);
        expect(ids.includes('pinus-taeda')).to.equal(edition === first);
      }
    } finally {
      await pool.close();
    }
  });

  it('turns calls away with a 503 busy problem once the queue is full, and answers the rest', async () => {
    const pool = new IdentifyPool(1, 1);
    try {
      await pool.identify(first, LOBLOLLY);
      const settled = await Promise.allSettled(Array.from({ length: 30 }, () => pool.identify(first, LOBLOLLY)));
      const busy = settled.filter((s) => s.status === 'rejected');
      const answered = settled.filter((s) => s.status === 'fulfilled');
      expect(busy.length).to.be.greaterThan(0);
      expect(answered.length).to.be.greaterThan(0);
      for (const s of busy) {
        const reason = (s as PromiseRejectedResult).reason as IdentifyBusy;
        expect(reason).to.be.instanceOf(IdentifyBusy);
        expect(reason.status).to.equal(503);
        expect(reason.retryAfterSeconds).to.be.greaterThan(0);
      }
    } finally {
      await pool.close();
    }
  });
});
