import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import request from 'supertest';
import { decodeBundle } from '@shared/engine';
import type { CreatedApp } from '../../api/src/app';
import { REPO_ROOT } from '../../api/src/config';
import { loadGlossary } from '../data/matrix-facts';
import { assertContractKept, startTestApp } from './support/test-app';

// The shared glossary beside the checkout, or the committed copy when the checkout stands alone.
const { glossary } = loadGlossary();

describe('api: published lookups (taxa, traits, editions, bundle)', () => {
  let created: CreatedApp;

  before(async () => {
    created = await startTestApp();
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  describe('GET /api/v1/taxa', () => {
    // Common name "loblolly pine" for Pinus taeda: USDA Agriculture Handbook 541, Checklist of United States Trees (from memory).
    it('finds a species by a misspelt common name (fuzzy search)', async () => {
      const res = await request(created.app).get('/api/v1/taxa').query({ q: 'lobloly' }).expect(200);
      expect(res.body.items.map((t: { id: string }) => t.id)).to.include('pinus-taeda');
      expect(res.body.edition.id).to.equal(1);
    });

    it('finds a species by its scientific name, best match first', async () => {
      const res = await request(created.app).get('/api/v1/taxa').query({ q: 'Pinus strobus' }).expect(200);
      expect(res.body.items[0].id).to.equal('pinus-strobus');
    });

    it('pages through every taxon with a stable total and no overlap between pages', async () => {
      const first = await request(created.app).get('/api/v1/taxa').query({ pageSize: 5, page: 1 }).expect(200);
      const second = await request(created.app).get('/api/v1/taxa').query({ pageSize: 5, page: 2 }).expect(200);
      const all = await request(created.app).get('/api/v1/taxa').query({ pageSize: 100 }).expect(200);
      expect(first.body.total).to.equal(all.body.total).and.to.equal(second.body.total);
      expect(first.body.items).to.have.length(5);
      const firstIds = first.body.items.map((t: { id: string }) => t.id);
      const secondIds = second.body.items.map((t: { id: string }) => t.id);
      expect(firstIds.filter((id: string) => secondIds.includes(id))).to.deep.equal([]);
      expect(all.body.items.slice(5, 10).map((t: { id: string }) => t.id)).to.deep.equal(secondIds);
    });

    it('rejects a page size above 100 naming the parameter', async () => {
      const res = await request(created.app).get('/api/v1/taxa').query({ pageSize: 101 }).expect(400);
      expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
      expect(res.body['invalid-params'].map((p: { name: string }) => p.name).join(' ')).to.contain('pageSize');
    });

    it('rejects unknown and mistyped query parameters', async () => {
      await request(created.app).get('/api/v1/taxa').query({ sort: 'name' }).expect(400);
      const res = await request(created.app).get('/api/v1/taxa').query({ page: 'two' }).expect(400);
      expect(res.body['invalid-params'].map((p: { name: string }) => p.name).join(' ')).to.contain('page');
    });

    it('treats an SQL-looking query as plain text and changes nothing', async () => {
      const before = await created.context.models.Taxon.count();
      const res = await request(created.app).get('/api/v1/taxa').query({ q: "'; DROP TABLE taxa; --" }).expect(200);
      expect(res.body.total).to.equal(0);
      expect(await created.context.models.Taxon.count()).to.equal(before);
    });
  });

  describe('GET /api/v1/taxa/{id}', () => {
    // Pinus taeda: needles 3 (occasionally 2) per fascicle, Flora of North America vol. 2 (from memory).
    it('lists the coded traits with labels, look-alikes, photos and cautions', async () => {
      const res = await request(created.app).get('/api/v1/taxa/pinus-taeda').expect(200);
      expect(res.body.taxon.scientificName).to.equal('Pinus taeda');
      const fascicle = res.body.traits.find((t: { trait: string }) => t.trait === 'needles-per-fascicle');
      expect(fascicle.values).to.deep.include({ code: '3', label: fascicle.values.find((v: { code: string }) => v.code === '3').label, frequency: 'usual' });
      const foliage = res.body.traits.find((t: { trait: string }) => t.trait === 'foliage');
      expect(foliage.values[0]).to.deep.equal({ code: 'needle', label: 'Needles', frequency: 'usual' });
      const length = res.body.traits.find((t: { trait: string }) => t.trait === 'needle-length');
      expect(length.unit).to.equal('cm');
      expect(length.range.low).to.be.at.most(length.range.high);
      expect(res.body.lookAlikes.map((t: { id: string }) => t.id)).to.include('pinus-echinata');
      expect(res.body.photos).to.deep.equal([]);
      expect(res.body.generalCautions.join(' ')).to.match(/not advice on eating/);
    });

    it('leaves out traits that are inapplicable to the taxon', async () => {
      const res = await request(created.app).get('/api/v1/taxa/quercus-alba').expect(200);
      const codes = res.body.traits.map((t: { trait: string }) => t.trait);
      expect(codes).to.include('leaf-arrangement');
      expect(codes).to.not.include('needles-per-fascicle');
    });

    it('answers an unknown taxon with a 404 problem and a malformed id with 400', async () => {
      const missing = await request(created.app).get('/api/v1/taxa/pinus-nonexistens').expect(404);
      expect(missing.body.type).to.match(/\/problems\/not-found$/);
      expect(missing.body.detail).to.contain('pinus-nonexistens');
      const malformed = await request(created.app).get('/api/v1/taxa/Pinus%20Taeda').expect(400);
      expect(malformed.body['invalid-params'][0].name).to.contain('id');
    });
  });

  describe('GET /api/v1/traits', () => {
    it('carries every core glossary trait and value code verbatim', async () => {
      const res = await request(created.app).get('/api/v1/traits').expect(200);
      const byCode = new Map<string, { values: Array<{ code: string }> }>(res.body.traits.map((t: { code: string }) => [t.code, t]));
      expect(glossary.traits.length, 'core glossary traits').to.be.greaterThan(20);
      for (const trait of glossary.traits) {
        expect(byCode.has(trait.code), trait.code).to.be.true;
        const served = byCode.get(trait.code)!.values.map((v) => v.code);
        for (const value of trait.values ?? []) expect(served, `${trait.code}/${value.code}`).to.include(value.code);
      }
    });

    it('points value drawings at /illustrations/ files that exist', async () => {
      const res = await request(created.app).get('/api/v1/traits').expect(200);
      const urls: string[] = res.body.traits.flatMap((t: { values: Array<{ illustrationUrl: string | null }> }) =>
        t.values.map((v) => v.illustrationUrl).filter((u): u is string => u !== null),
      );
      expect(urls.length).to.be.greaterThan(20);
      for (const url of urls) {
        expect(url).to.match(/^\/illustrations\/[a-z0-9-]+\/[a-z0-9-]+\.svg$/);
        expect(fs.existsSync(path.join(REPO_ROOT, 'seeds', url)), url).to.be.true;
      }
    });
  });

  // RFC 9110 §8.8.3 (ETag), §13.1.2 (If-None-Match uses weak comparison), §15.4.5 (304 has no content).
  describe('HTTP caching of lookups', () => {
    it('sends a strong ETag and answers a matching If-None-Match with 304 and no body', async () => {
      const first = await request(created.app).get('/api/v1/traits').expect(200);
      const etag = first.headers['etag'];
      expect(etag).to.match(/^"[^"]+"$/);
      expect(first.headers['cache-control'])
        .to.match(/public/)
        .and.match(/max-age=\d+/);
      expect(first.headers['vary']).to.match(/Authorization/i);
      const again = await request(created.app).get('/api/v1/traits').set('If-None-Match', etag).expect(304);
      expect(again.text ?? '').to.equal('');
      await request(created.app).get('/api/v1/traits').set('If-None-Match', `W/${etag}`).expect(304);
      await request(created.app).get('/api/v1/traits').set('If-None-Match', `"other", ${etag}`).expect(304);
      await request(created.app).get('/api/v1/traits').set('If-None-Match', '"something-else"').expect(200);
    });

    it('gives different pages different validators', async () => {
      const one = await request(created.app).get('/api/v1/taxa').query({ page: 1, pageSize: 3 }).expect(200);
      const two = await request(created.app).get('/api/v1/taxa').query({ page: 2, pageSize: 3 }).expect(200);
      expect(one.headers['etag']).to.not.equal(two.headers['etag']);
      await request(created.app).get('/api/v1/taxa').query({ page: 2, pageSize: 3 }).set('If-None-Match', one.headers['etag']).expect(200);
    });
  });

  describe('editions and the bundle', () => {
    it('lists edition 1 as current with its change summary', async () => {
      const res = await request(created.app).get('/api/v1/editions').expect(200);
      expect(res.body.current).to.equal(1);
      expect(res.body.editions[0].number).to.equal(1);
      expect(res.body.editions[0].summary.taxonCount).to.be.greaterThan(20);
      const one = await request(created.app).get('/api/v1/editions/1').expect(200);
      expect(one.body.summary).to.deep.equal(res.body.editions[0].summary);
      await request(created.app).get('/api/v1/editions/99').expect(404);
      await request(created.app).get('/api/v1/editions/first').expect(400);
    });

    it('serves the current bundle as public octet-stream that decodes to the edition', async () => {
      const res = await request(created.app)
        .get('/api/v1/editions/current/bundle')
        .buffer(true)
        .parse((response, done) => {
          const chunks: Buffer[] = [];
          response.on('data', (chunk: Buffer) => chunks.push(chunk));
          response.on('end', () => done(null, Buffer.concat(chunks)));
        })
        .expect(200);
      expect(res.headers['content-type']).to.match(/^application\/octet-stream/);
      expect(res.headers['cache-control'])
        .to.match(/^public/)
        .and.match(/max-age=\d+/);
      expect(res.headers['etag']).to.match(/^"edition-1-[^"]+"$/);
      expect(res.headers['x-sylvasift-edition']).to.equal('1');
      const compiled = decodeBundle(new Uint8Array(res.body as Buffer));
      const taxa = await request(created.app).get('/api/v1/taxa').query({ pageSize: 100 }).expect(200);
      expect(compiled.taxonCount).to.equal(taxa.body.total);
      await request(created.app).get('/api/v1/editions/current/bundle').set('If-None-Match', res.headers['etag']).expect(304);
    });
  });
});
