import { expect } from 'chai';
import sharp from 'sharp';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { loadOpenApiDocument } from '../../api/src/docs/openapi-document';
import { OPENAPI_PATH } from '../../api/src/config';
import { hashToken } from '../../api/src/auth/tokens';
import type { Role, Scope } from '../../api/src/auth/principal';
import { assertContractKept, startTestApp } from './support/test-app';
import { testDialect } from './support/test-database';
import { createPartnerKey, signUpAndSignIn, uniqueEmail, type SignedInUser } from './support/accounts';

/**
 * Every operation in openapi.yaml × every kind of caller → the status it must get. Requests are
 * valid for the contract, so the status shows the permission: 401 without credentials
 * (RFC 6750 §3), 403 for a known caller without the role or scope, and the route's own answer
 * otherwise. An operation in openapi.yaml without a row here fails the test.
 */
const CALLERS = ['anonymous', 'learner', 'coach', 'curator', 'reviewer', 'admin', 'keyWithScope', 'keyWithoutScope'] as const;
type Caller = (typeof CALLERS)[number];
type Expected = Record<Caller, number>;

interface Prepared {
  url: string;
  body?: object;
  attach?: { field: string; file: Buffer; name: string };
}

interface Row {
  operation: string;
  /** the scope a key needs; user-only and open routes name none (a key then counts as lacking it) */
  scope?: Scope;
  prepare(caller: Caller): Promise<Prepared> | Prepared;
  expect: Expected;
}

const ROLES: Role[] = ['learner', 'coach', 'curator', 'reviewer', 'admin'];
/** The backup routes answer 501 on PostgreSQL (see admin.spec.ts). */
const BACKUPS_REFUSED = testDialect() === 'postgres';

/** Everyone, signed in or not, gets `status`. */
const everyone = (status: number): Expected => Object.fromEntries(CALLERS.map((c) => [c, status])) as Expected;
/** Open to anonymous callers and users; a key needs the scope. */
const openButKeysNeedScope = (status: number): Expected => ({ ...everyone(status), keyWithoutScope: 403 });
/** Signed-in users with one of `roles` (admin always) get `status`; other users 403, keys 403, anonymous 401. */
function users(status: number, roles: Role[] = ROLES, otherUsers = 403): Expected {
  const allowed = new Set<Role>([...roles, 'admin']);
  const result = { anonymous: 401, keyWithScope: 403, keyWithoutScope: 403 } as Expected;
  for (const role of ROLES) result[role] = allowed.has(role) ? status : otherUsers;
  return result;
}

describe('api: permission table (every route × every caller)', function () {
  this.timeout(120_000);
  let created: CreatedApp;
  const people = {} as Record<Role, SignedInUser>;
  const keys = {} as Record<Scope, string>;
  let raiser: SignedInUser;
  let tinyJpeg: Buffer;
  let counter = 0;
  const unique = (label: string) => `${label}-${++counter}`;

  function headersFor(caller: Caller, scope: Scope | undefined): Record<string, string> {
    if (caller === 'anonymous') return {};
    if (caller === 'keyWithScope') return { Authorization: `Bearer ${keys[scope ?? 'lookup']}` };
    if (caller === 'keyWithoutScope') return { Authorization: `Bearer ${keys[scope === 'lookup' ? 'identify' : 'lookup']}` };
    return { Authorization: `Bearer ${people[caller].token}` };
  }

  async function freshUser(role: Role = 'learner'): Promise<SignedInUser> {
    return signUpAndSignIn(created, role);
  }

  async function openQuery(): Promise<number> {
    const res = await request(created.app)
      .post('/api/v1/queries')
      .set('Authorization', `Bearer ${raiser.token}`)
      .send({ taxonId: 'pinus-taeda', traitCode: 'needle-form', note: 'Permission table query.' })
      .expect(201);
    return res.body.id as number;
  }

  /** An unshared study set owned by `owner` (a fresh coach unless given). */
  async function studySet(owner?: SignedInUser): Promise<number> {
    const coach = owner ?? (await freshUser('coach'));
    const res = await request(created.app)
      .post('/api/v1/study-sets')
      .set('Authorization', `Bearer ${coach.token}`)
      .send({ name: unique('Permission table set'), shared: false, taxa: ['pinus-taeda', 'quercus-alba'] })
      .expect(201);
    return res.body.id as number;
  }

  /** Recodes one cell of the working matrix to a value it has not had (a test edit, not a fact). */
  async function recodeACell(): Promise<void> {
    const url = '/api/v1/curation/cells/pinus-taeda/needle-length';
    const auth = { Authorization: `Bearer ${people.curator.token}` };
    const cell = await request(created.app).get(url).set(auth).expect(200);
    await request(created.app)
      .put(url)
      .set(auth)
      .send({ value: { min: 10, low: 15, high: 23, max: 30 + ++counter / 10 }, version: cell.body.version, reason: 'Permission table: something to publish' })
      .expect(200);
  }

  async function oneTimeToken(purpose: 'password-reset' | 'invitation'): Promise<string> {
    const token = `svl_${unique('permission-table-link')}-${'x'.repeat(32)}`;
    const user = purpose === 'password-reset' ? await freshUser() : undefined;
    await created.context.models.OneTimeToken.create({
      purpose,
      tokenHash: hashToken(token),
      email: user?.email ?? uniqueEmail('invitee'),
      userId: user?.userId ?? null,
      role: purpose === 'invitation' ? 'coach' : null,
      createdBy: null,
      expiresAt: new Date(Date.now() + 3_600_000),
      usedAt: null,
    });
    return token;
  }

  const rows = (): Row[] => [
    { operation: 'GET /api/health', prepare: () => ({ url: '/api/health' }), expect: everyone(200) },
    { operation: 'GET /api/problems/{name}', prepare: () => ({ url: '/api/problems/forbidden' }), expect: everyone(200) },

    // identify and published lookups
    {
      operation: 'POST /api/v1/identify',
      scope: 'identify',
      prepare: () => ({ url: '/api/v1/identify', body: { observations: [{ trait: 'needles-per-fascicle', values: [3] }] } }),
      expect: { ...everyone(200), anonymous: 401, keyWithoutScope: 403 },
    },
    { operation: 'GET /api/v1/taxa', scope: 'lookup', prepare: () => ({ url: '/api/v1/taxa' }), expect: openButKeysNeedScope(200) },
    { operation: 'GET /api/v1/taxa/{id}', scope: 'lookup', prepare: () => ({ url: '/api/v1/taxa/pinus-taeda' }), expect: openButKeysNeedScope(200) },
    { operation: 'GET /api/v1/traits', scope: 'lookup', prepare: () => ({ url: '/api/v1/traits' }), expect: openButKeysNeedScope(200) },
    {
      operation: 'POST /api/v1/compare',
      scope: 'lookup',
      prepare: () => ({ url: '/api/v1/compare', body: { taxa: ['pinus-taeda', 'pinus-echinata'] } }),
      expect: openButKeysNeedScope(200),
    },
    { operation: 'GET /api/v1/editions', scope: 'lookup', prepare: () => ({ url: '/api/v1/editions' }), expect: openButKeysNeedScope(200) },
    { operation: 'GET /api/v1/editions/{number}', scope: 'lookup', prepare: () => ({ url: '/api/v1/editions/1' }), expect: openButKeysNeedScope(200) },
    {
      operation: 'GET /api/v1/editions/current/bundle',
      scope: 'lookup',
      prepare: () => ({ url: '/api/v1/editions/current/bundle' }),
      expect: openButKeysNeedScope(200),
    },
    {
      operation: 'GET /api/v1/photos/{name}',
      scope: 'lookup',
      prepare: () => ({ url: `/api/v1/photos/${'0'.repeat(32)}.webp` }),
      expect: openButKeysNeedScope(404),
    },
    {
      operation: 'POST /api/v1/editions',
      // a draft that differs from the current edition, so whoever may publish has something to publish
      prepare: async () => {
        await recodeACell();
        return { url: '/api/v1/editions', body: { title: unique('Permission table edition'), reason: 'checking who may publish' } };
      },
      expect: users(201, ['curator']),
    },
    {
      operation: 'POST /api/v1/taxa/{id}/photos',
      prepare: () => ({ url: '/api/v1/taxa/no-such-taxon/photos', attach: { field: 'photo', file: tinyJpeg, name: 'bark.jpg' } }),
      expect: users(404, ['curator']),
    },

    // the Matrix desk
    {
      operation: 'GET /api/v1/curation/cells/{taxonId}/{traitCode}',
      prepare: () => ({ url: '/api/v1/curation/cells/pinus-taeda/needle-form' }),
      expect: users(200, ['curator']),
    },
    {
      operation: 'PUT /api/v1/curation/cells/{taxonId}/{traitCode}',
      prepare: () => ({ url: '/api/v1/curation/cells/no-such-taxon/needle-form', body: { value: 'unknown', version: 1, reason: 'who may write' } }),
      expect: users(404, ['curator']),
    },
    {
      operation: 'POST /api/v1/curation/taxa',
      prepare: () => {
        const id = unique('pinus-permissionis');
        return {
          url: '/api/v1/curation/taxa',
          body: { id, scientificName: `Pinus ${id}`, authority: 'Invented', family: 'Pinaceae', commonNames: [id], reason: 'who may add taxa' },
        };
      },
      expect: users(201, ['curator']),
    },
    {
      operation: 'PATCH /api/v1/curation/taxa/{id}',
      prepare: () => ({ url: '/api/v1/curation/taxa/no-such-taxon', body: { retired: true, reason: 'who may edit' } }),
      expect: users(404, ['curator']),
    },
    {
      operation: 'POST /api/v1/curation/traits',
      prepare: () => ({
        url: '/api/v1/curation/traits',
        body: {
          code: unique('bark-permission'),
          label: 'Permission',
          part: 'bark',
          kind: 'state',
          season: 'any',
          ease: 1,
          errorRate: 0.1,
          values: [
            { code: 'yes', label: 'Yes' },
            { code: 'no', label: 'No' },
          ],
          reason: 'who may add traits',
        },
      }),
      expect: users(201, ['curator']),
    },
    {
      operation: 'PATCH /api/v1/curation/traits/{code}',
      prepare: () => ({ url: '/api/v1/curation/traits/no-such-trait', body: { label: 'Renamed', reason: 'who may edit' } }),
      expect: users(404, ['curator']),
    },
    {
      operation: 'POST /api/v1/curation/traits/{code}/values',
      prepare: () => ({ url: '/api/v1/curation/traits/no-such-trait/values', body: { code: 'anything', label: 'Anything', reason: 'who may add values' } }),
      expect: users(404, ['curator']),
    },
    {
      operation: 'PATCH /api/v1/curation/traits/{code}/values/{value}',
      prepare: () => ({ url: '/api/v1/curation/traits/no-such-trait/values/anything', body: { label: 'Renamed', reason: 'who may edit' } }),
      expect: users(404, ['curator']),
    },
    { operation: 'GET /api/v1/curation/audit', prepare: () => ({ url: '/api/v1/curation/audit' }), expect: users(200, ['curator']) },
    { operation: 'GET /api/v1/curation/matrix', prepare: () => ({ url: '/api/v1/curation/matrix' }), expect: users(200, ['curator']) },
    { operation: 'GET /api/v1/curation/draft/summary', prepare: () => ({ url: '/api/v1/curation/draft/summary' }), expect: users(200, ['curator']) },
    {
      operation: 'POST /api/v1/curation/imports',
      prepare: () => ({
        url: '/api/v1/curation/imports?mode=dry-run',
        attach: {
          field: 'file',
          file: Buffer.from('taxon,trait,usual,occasional,rare,min,low,high,max,state\npinus-taeda,pith,,,,,,,,unknown\n'),
          name: 'who-may-import.csv',
        },
      }),
      expect: users(200, ['curator']),
    },

    // accounts and sessions: open routes; a key header is accepted and ignored
    {
      operation: 'POST /api/v1/accounts',
      prepare: () => ({ url: '/api/v1/accounts', body: { email: uniqueEmail('perm'), password: 'permission table', displayName: 'Perm' } }),
      expect: everyone(201),
    },
    {
      operation: 'POST /api/v1/sessions',
      prepare: () => ({ url: '/api/v1/sessions', body: { email: raiser.email, password: raiser.password } }),
      expect: everyone(201),
    },
    { operation: 'DELETE /api/v1/sessions/current', prepare: () => ({ url: '/api/v1/sessions/current' }), expect: users(204) },
    { operation: 'GET /api/v1/me', prepare: () => ({ url: '/api/v1/me' }), expect: users(200) },
    {
      operation: 'POST /api/v1/password-resets',
      prepare: () => ({ url: '/api/v1/password-resets', body: { email: uniqueEmail('reset') } }),
      expect: everyone(202),
    },
    {
      operation: 'POST /api/v1/password-resets/{token}',
      prepare: async () => ({ url: `/api/v1/password-resets/${await oneTimeToken('password-reset')}`, body: { password: 'permission table reset' } }),
      expect: everyone(204),
    },
    {
      operation: 'POST /api/v1/invitations/{token}',
      prepare: async () => ({
        url: `/api/v1/invitations/${await oneTimeToken('invitation')}`,
        body: { displayName: 'Invitee', password: 'permission table invite' },
      }),
      expect: everyone(201),
    },

    // partner keys
    { operation: 'GET /api/v1/keys', prepare: () => ({ url: '/api/v1/keys' }), expect: users(200) },
    { operation: 'POST /api/v1/keys', prepare: () => ({ url: '/api/v1/keys', body: { name: 'Permission table', scopes: ['lookup'] } }), expect: users(201) },
    // the calling key itself, whatever its scopes; users are told to use a key
    {
      operation: 'GET /api/v1/keys/current',
      prepare: () => ({ url: '/api/v1/keys/current' }),
      expect: { ...users(403), anonymous: 401, keyWithScope: 200, keyWithoutScope: 200 },
    },
    {
      operation: 'GET /api/v1/keys/{id}',
      prepare: async (caller) => {
        // users read a key of their own (the Location a new key answers with); the others aim at someone else's
        const owner = ROLES.includes(caller as Role) ? people[caller as Role] : raiser;
        const { id } = await createPartnerKey(created, owner.token, ['lookup']);
        return { url: `/api/v1/keys/${id}` };
      },
      expect: users(200),
    },
    {
      operation: 'PATCH /api/v1/keys/{id}',
      prepare: async (caller) => {
        // users change a key of their own; the others aim at someone else's
        const owner = ROLES.includes(caller as Role) ? people[caller as Role] : raiser;
        const { id } = await createPartnerKey(created, owner.token, ['lookup']);
        return { url: `/api/v1/keys/${id}`, body: { allowedOrigins: ['https://trail.example'] } };
      },
      expect: users(200),
    },
    {
      operation: 'DELETE /api/v1/keys/{id}',
      prepare: async (caller) => {
        // users revoke a key of their own; the others aim at someone else's
        const owner = ROLES.includes(caller as Role) ? people[caller as Role] : raiser;
        const { id } = await createPartnerKey(created, owner.token, ['lookup']);
        return { url: `/api/v1/keys/${id}` };
      },
      expect: users(204),
    },

    {
      operation: 'GET /api/v1/keys/{id}/usage',
      prepare: async (caller) => {
        // users read a key of their own; the others aim at someone else's
        const owner = ROLES.includes(caller as Role) ? people[caller as Role] : raiser;
        const { id } = await createPartnerKey(created, owner.token, ['lookup']);
        return { url: `/api/v1/keys/${id}/usage` };
      },
      expect: users(200),
    },

    // admin
    { operation: 'GET /api/v1/admin/users', prepare: () => ({ url: '/api/v1/admin/users' }), expect: users(200, ['admin']) },
    {
      operation: 'PATCH /api/v1/admin/users/{id}',
      prepare: async () => ({ url: `/api/v1/admin/users/${(await freshUser()).userId}`, body: { role: 'coach' } }),
      expect: users(200, ['admin']),
    },
    {
      operation: 'POST /api/v1/admin/invitations',
      prepare: () => ({ url: '/api/v1/admin/invitations', body: { email: uniqueEmail('invite'), role: 'learner' } }),
      expect: users(201, ['admin']),
    },
    { operation: 'GET /api/v1/admin/keys', prepare: () => ({ url: '/api/v1/admin/keys' }), expect: users(200, ['admin']) },
    {
      operation: 'DELETE /api/v1/admin/keys/{id}',
      prepare: async () => ({ url: `/api/v1/admin/keys/${(await createPartnerKey(created, raiser.token, ['lookup'])).id}` }),
      expect: users(204, ['admin']),
    },
    // Backups copy SQLite files; on PostgreSQL an admin gets the 501 that names pg_dump instead.
    { operation: 'GET /api/v1/admin/backups', prepare: () => ({ url: '/api/v1/admin/backups' }), expect: users(BACKUPS_REFUSED ? 501 : 200, ['admin']) },
    { operation: 'POST /api/v1/admin/backups', prepare: () => ({ url: '/api/v1/admin/backups' }), expect: users(BACKUPS_REFUSED ? 501 : 201, ['admin']) },
    // a name of the right shape with no file behind it: admins get through the guard to the 404
    {
      operation: 'GET /api/v1/admin/backups/{name}',
      prepare: () => ({ url: '/api/v1/admin/backups/sylvasift-20260101T000000000Z-000000.sqlite' }),
      expect: users(BACKUPS_REFUSED ? 501 : 404, ['admin']),
    },
    {
      operation: 'POST /api/v1/admin/backups/{name}/restore',
      prepare: () => ({ url: '/api/v1/admin/backups/sylvasift-20260101T000000000Z-000000.sqlite/restore' }),
      expect: users(BACKUPS_REFUSED ? 501 : 404, ['admin']),
    },

    // queries and the Second look
    { operation: 'GET /api/v1/queries', prepare: () => ({ url: '/api/v1/queries' }), expect: users(200) },
    {
      operation: 'POST /api/v1/queries',
      prepare: () => ({ url: '/api/v1/queries', body: { taxonId: 'pinus-taeda', traitCode: 'needle-length', note: 'Who may raise queries.' } }),
      expect: users(201),
    },
    // someone else's query: reviewers and admins see it, other users are told it is not there
    { operation: 'GET /api/v1/queries/{id}', prepare: async () => ({ url: `/api/v1/queries/${await openQuery()}` }), expect: users(200, ['reviewer'], 404) },
    // the queried cell in the working matrix, with its version: for those who may recode it
    {
      operation: 'GET /api/v1/queries/{id}/cell',
      prepare: async () => ({ url: `/api/v1/queries/${await openQuery()}/cell` }),
      expect: users(200, ['reviewer']),
    },
    {
      operation: 'POST /api/v1/queries/{id}/answer',
      prepare: async () => ({ url: `/api/v1/queries/${await openQuery()}/answer`, body: { answer: 'Answered for the permission table.' } }),
      expect: users(200, ['reviewer']),
    },
    {
      operation: 'POST /api/v1/queries/{id}/settle',
      prepare: async () => {
        const id = await openQuery();
        await request(created.app)
          .post(`/api/v1/queries/${id}/answer`)
          .set('Authorization', `Bearer ${people.reviewer.token}`)
          .send({ answer: 'Answered first.' })
          .expect(200);
        return { url: `/api/v1/queries/${id}/settle`, body: {} };
      },
      expect: users(200, ['reviewer']),
    },
    {
      operation: 'POST /api/v1/queries/{id}/recode',
      prepare: async () => ({ url: `/api/v1/queries/${await openQuery()}/recode`, body: { value: 'unknown', version: 999, reason: 'stale on purpose' } }),
      // a reviewer gets through the guard to the cell's version check
      expect: users(409, ['reviewer']),
    },

    // study sets
    { operation: 'GET /api/v1/study-sets', prepare: () => ({ url: '/api/v1/study-sets' }), expect: users(200, ['coach']) },
    {
      operation: 'POST /api/v1/study-sets',
      prepare: () => ({ url: '/api/v1/study-sets', body: { name: unique('Permission table set'), taxa: ['pinus-taeda'] } }),
      expect: users(201, ['coach']),
    },
    // another coach's unshared set: admins see it, other users are told it is not there
    { operation: 'GET /api/v1/study-sets/{id}', prepare: async () => ({ url: `/api/v1/study-sets/${await studySet()}` }), expect: users(200, [], 404) },
    {
      operation: 'PATCH /api/v1/study-sets/{id}',
      // a coach changes a set of their own; everyone else aims at another coach's
      prepare: async (caller) => ({
        url: `/api/v1/study-sets/${await studySet(caller === 'coach' ? people.coach : undefined)}`,
        body: { notes: 'Who may change it.' },
      }),
      expect: users(200, ['coach']),
    },
    {
      operation: 'DELETE /api/v1/study-sets/{id}',
      prepare: async (caller) => ({ url: `/api/v1/study-sets/${await studySet(caller === 'coach' ? people.coach : undefined)}` }),
      expect: users(204, ['coach']),
    },
  ];

  before(async () => {
    created = await startTestApp();
    for (const role of ROLES) people[role] = await signUpAndSignIn(created, role);
    raiser = await signUpAndSignIn(created, 'learner');
    keys.lookup = (await createPartnerKey(created, raiser.token, ['lookup'])).key;
    keys.identify = (await createPartnerKey(created, raiser.token, ['identify'])).key;
    tinyJpeg = await sharp({ create: { width: 16, height: 16, channels: 3, background: '#5a4632' } })
      .jpeg()
      .toBuffer();
  });
  after(() => created.close());

  it('has a row for every operation in openapi.yaml, and no row for one that is not there', () => {
    const document = loadOpenApiDocument(OPENAPI_PATH);
    const operations = Object.entries(document.paths ?? {}).flatMap(([path, item]) =>
      ['get', 'put', 'post', 'patch', 'delete'].filter((method) => item && method in item).map((method) => `${method.toUpperCase()} ${path}`),
    );
    expect(
      rows()
        .map((r) => r.operation)
        .sort(),
    ).to.deep.equal(operations.sort());
  });

  it('gives every caller the expected status on every route', async () => {
    const failures: string[] = [];
    for (const row of rows()) {
      const [method, template] = row.operation.split(' ') as [string, string];
      for (const caller of CALLERS) {
        const prepared = await row.prepare(caller);
        let call = request(created.app)[method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete'](prepared.url).set(headersFor(caller, row.scope));
        if (prepared.attach) call = call.attach(prepared.attach.field, prepared.attach.file, prepared.attach.name);
        else if (prepared.body) call = call.send(prepared.body);
        const res = await call;
        const expected = row.expect[caller];
        if (res.status !== expected) failures.push(`${row.operation} as ${caller}: expected ${expected}, got ${res.status} ${res.body?.detail ?? ''}`);
        if (res.status === 401 && !res.headers['www-authenticate']?.startsWith('Bearer'))
          failures.push(`${row.operation} as ${caller}: 401 without a Bearer challenge`);
        // sign-out ended the caller's session; give them a fresh one
        if (template === '/api/v1/sessions/current' && res.status === 204 && ROLES.includes(caller as Role)) {
          const role = caller as Role;
          const again = await request(created.app).post('/api/v1/sessions').send({ email: people[role].email, password: people[role].password }).expect(201);
          people[role] = { ...people[role], token: again.body.token };
        }
      }
    }
    expect(failures, failures.join('\n')).to.deep.equal([]);
    assertContractKept(created);
  });

  it('refuses a caller without the right before it reads their body (401 or 403, not a detailed 400)', async () => {
    // fresh keys, so the per-minute quota the table above used up does not answer 429 here
    keys.lookup = (await createPartnerKey(created, raiser.token, ['lookup'])).key;
    keys.identify = (await createPartnerKey(created, raiser.token, ['identify'])).key;
    const failures: string[] = [];
    for (const row of rows()) {
      const [method] = row.operation.split(' ') as [string, string];
      for (const caller of CALLERS) {
        const expected = row.expect[caller];
        if (expected !== 401 && expected !== 403) continue;
        const prepared = await row.prepare(caller);
        if (!prepared.body && !prepared.attach) continue;
        // a body no operation accepts: an unknown property and a wrong type
        const agent = request(created.app);
        const verb = method.toLowerCase() as 'post' | 'put' | 'patch';
        const res = await agent[verb](prepared.url).set(headersFor(caller, row.scope)).send({ notAField: true, reason: 42 });
        if (res.status !== expected)
          failures.push(`${row.operation} as ${caller} with a bad body: expected ${expected}, got ${res.status} ${res.body?.detail ?? ''}`);
      }
    }
    expect(failures, failures.join('\n')).to.deep.equal([]);
    assertContractKept(created);
  });
});
