import { createRequire } from 'node:module';
import { expect } from 'chai';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { rememberCompiledPaths } from '../../api/src/http/openapi-validation';
import { createPartnerKey, signUpAndSignIn } from './support/accounts';
import { assertContractKept, startTestApp } from './support/test-app';

interface CompiledPath {
  regexp: RegExp;
  keys: Array<{ name: string }>;
}
type PathToRegexp = (path: unknown, options?: Record<string, unknown>) => CompiledPath;

/** path-to-regexp as the validator resolves it from its own package. */
function validatorsPathToRegexp(): PathToRegexp {
  const fromValidator = createRequire(createRequire(import.meta.url).resolve('express-openapi-validator'));
  return (fromValidator('path-to-regexp') as { pathToRegexp: PathToRegexp }).pathToRegexp;
}

const SIGHTING = { observations: [{ trait: 'foliage', values: ['needle'] }], season: 'leaf-on' };

describe('api: request validation against openapi.yaml', () => {
  let created: CreatedApp;
  let key: string;

  before(async () => {
    created = await startTestApp();
    const user = await signUpAndSignIn(created, 'learner');
    key = (await createPartnerKey(created, user.token, ['identify', 'lookup'])).key;
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  it('compiles each documented path once, not again on every request', async () => {
    const sweep = async () => {
      await request(created.app).post('/api/v1/identify').set('Authorization', `Bearer ${key}`).send(SIGHTING).expect(200);
      await request(created.app).get('/api/v1/taxa/pinus-taeda').set('Authorization', `Bearer ${key}`).expect(200);
      await request(created.app).get('/api/v1/traits').set('Authorization', `Bearer ${key}`).expect(200);
    };
    await sweep();
    const { patterns } = rememberCompiledPaths();
    const afterFirst = patterns();
    expect(afterFirst).to.be.greaterThan(0);
    for (let round = 0; round < 5; round++) await sweep();
    expect(patterns()).to.equal(afterFirst);
  });

  it('still rejects a body the contract forbids once the patterns are remembered', async () => {
    for (let round = 0; round < 2; round++) {
      const response = await request(created.app)
        .post('/api/v1/identify')
        .set('Authorization', `Bearer ${key}`)
        .send({ observations: [{ trait: 'foliage', values: ['needle'] }], season: 'midwinter' })
        .expect(400);
      expect(response.body['invalid-params'].map((param: { name: string }) => param.name)).to.include('/body/season');
    }
  });

  it('answers exactly what path-to-regexp compiles, per path and per options', () => {
    rememberCompiledPaths();
    const pathToRegexp = validatorsPathToRegexp();
    const insensitive = pathToRegexp('/api/v1/taxa/:id/photos', { sensitive: false, strict: false });
    expect(pathToRegexp('/api/v1/taxa/:id/photos', { sensitive: false, strict: false })).to.equal(insensitive);
    const sensitive = pathToRegexp('/api/v1/taxa/:id/photos', { sensitive: true, strict: false });
    expect(sensitive).to.not.equal(insensitive);
    expect(insensitive.regexp.flags).to.equal('i');
    expect(sensitive.regexp.flags).to.equal('');
    expect(insensitive.keys.map((k) => k.name)).to.deep.equal(['id']);
    expect(insensitive.regexp.exec('/API/V1/TAXA/quercus-alba/photos')?.[1]).to.equal('quercus-alba');
    expect(sensitive.regexp.exec('/API/V1/TAXA/quercus-alba/photos')).to.equal(null);
    // an option that is a function is never compared, so this compiles afresh: the remembered pattern must be the same
    const identity = (text: string) => text;
    for (const [path, options] of [
      ['/api/v1/taxa/:id/photos', { sensitive: false, strict: false }],
      ['/api/v1/keys/:id', { sensitive: true, strict: false }],
    ] as const) {
      const remembered = pathToRegexp(path, options);
      const compiled = pathToRegexp(path, { ...options, encodePath: identity });
      expect(compiled).to.not.equal(remembered);
      expect([remembered.regexp.source, remembered.regexp.flags]).to.deep.equal([compiled.regexp.source, compiled.regexp.flags]);
      expect(remembered.keys).to.deep.equal(compiled.keys);
    }
  });
});
