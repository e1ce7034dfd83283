import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { DEMO_ACCOUNTS, DEMO_EVENT, DEMO_PASSWORD } from '../../api/src/db/seeders/0002-demo-scenario';
import { DEMO_STUDY_SET } from '../../api/src/db/seeders/0003-demo-study-set';
import { createSeeder } from '../../api/src/db/migrator';
import { assertContractKept, startTestApp } from './support/test-app';
import { signUpAndSignIn, type SignedInUser } from './support/accounts';

interface Species {
  id: string;
  scientificName: string;
  commonNames: string[];
  retired: boolean;
}
interface StudySetBody {
  id: number;
  name: string;
  event: string | null;
  eventDate: string | null;
  notes: string | null;
  shared: boolean;
  ownerId: number;
  ownerName: string;
  taxa: Species[];
  createdAt: string;
  updatedAt: string;
}
interface InvalidParams {
  'invalid-params': Array<{ name: string; reason: string }>;
}

const PRODUCTION = { NODE_ENV: 'production', SMTP_URL: 'smtp://127.0.0.1:2525', DATABASE_URL: 'sqlite::memory:', LOG_LEVEL: 'silent', SCRYPT_N: '1024' };

describe('api: study sets', () => {
  let created: CreatedApp;
  let coach: SignedInUser;
  let otherCoach: SignedInUser;
  let learner: SignedInUser;
  let admin: SignedInUser;

  const auth = (user: SignedInUser | string) => ({ Authorization: `Bearer ${typeof user === 'string' ? user : user.token}` });
  const setCount = () => created.context.models.StudySet.count();
  const linkCount = () => created.context.models.StudySetTaxon.count();

  async function make(by: SignedInUser, body: Record<string, unknown> = {}): Promise<StudySetBody> {
    const res = await request(created.app)
      .post('/api/v1/study-sets')
      .set(auth(by))
      .send({ name: 'Practice list', taxa: ['pinus-taeda', 'quercus-alba'], ...body })
      .expect(201);
    return res.body as StudySetBody;
  }

  async function signInDemo(role: 'coach' | 'learner'): Promise<string> {
    const account = DEMO_ACCOUNTS.find((a) => a.role === role);
    const res = await request(created.app).post('/api/v1/sessions').send({ email: account?.email, password: DEMO_PASSWORD }).expect(201);
    return res.body.token as string;
  }

  before(async () => {
    created = await startTestApp();
    coach = await signUpAndSignIn(created, 'coach');
    otherCoach = await signUpAndSignIn(created, 'coach');
    learner = await signUpAndSignIn(created, 'learner');
    admin = await signUpAndSignIn(created, 'admin');
    await created.context.models.Taxon.create({
      id: 'pinus-retiredensis',
      scientificName: 'Pinus retiredensis',
      authority: 'Invented',
      family: 'Pinaceae',
      commonNames: ['retired test pine'],
      status: null,
      source: null,
      habitat: null,
      range: null,
      cautions: null,
      lookAlikes: null,
      retired: true,
    });
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  describe('making, reading, changing and deleting', () => {
    it('creates a set with its species in the order given, named from the taxa table', async () => {
      const res = await request(created.app)
        .post('/api/v1/study-sets')
        .set(auth(coach))
        .send({
          name: '  Fall practice  ',
          event: 'County meet',
          eventDate: '2027-10-02',
          notes: 'Twigs first.',
          taxa: ['liriodendron-tulipifera', 'acer-rubrum', 'pinus-taeda'],
        })
        .expect(201);
      const set = res.body as StudySetBody;
      expect(res.headers['location']).to.equal(`/api/v1/study-sets/${set.id}`);
      expect(set).to.include({
        name: 'Fall practice',
        event: 'County meet',
        eventDate: '2027-10-02',
        notes: 'Twigs first.',
        shared: false,
        ownerId: coach.userId,
      });
      expect(set.taxa.map((t) => t.id)).to.deep.equal(['liriodendron-tulipifera', 'acer-rubrum', 'pinus-taeda']);
      const taxon = await created.context.models.Taxon.findByPk('acer-rubrum');
      expect(set.taxa[1]).to.deep.equal({ id: 'acer-rubrum', scientificName: taxon?.scientificName, commonNames: taxon?.commonNames, retired: false });
      expect(set.taxa[1]?.scientificName).to.equal('Acer rubrum');

      const got = await request(created.app).get(`/api/v1/study-sets/${set.id}`).set(auth(coach)).expect(200);
      expect(got.body).to.deep.equal(set);
    });

    it('leaves the optional fields null when they are not given', async () => {
      const set = await make(coach);
      expect(set).to.include({ event: null, eventDate: null, notes: null, shared: false });
    });

    it('lists only the coach’s own sets, and every set for an admin', async () => {
      const mine = await make(coach, { name: 'Mine' });
      const theirs = await make(otherCoach, { name: 'Theirs' });
      const list = await request(created.app).get('/api/v1/study-sets').set(auth(coach)).expect(200);
      const ids = (list.body.studySets as StudySetBody[]).map((s) => s.id);
      expect(ids).to.include(mine.id).and.not.to.include(theirs.id);
      expect((list.body.studySets as StudySetBody[]).every((s) => s.ownerId === coach.userId)).to.equal(true);

      const all = await request(created.app).get('/api/v1/study-sets').set(auth(admin)).expect(200);
      expect((all.body.studySets as StudySetBody[]).map((s) => s.id)).to.include.members([mine.id, theirs.id]);
    });

    it('changes only the fields sent, replaces the species list, and clears fields set to null', async () => {
      const set = await make(coach, { event: 'Spring meet', notes: 'Bring a hand lens.' });
      const res = await request(created.app)
        .patch(`/api/v1/study-sets/${set.id}`)
        .set(auth(coach))
        .send({ notes: null, shared: true, taxa: ['quercus-rubra', 'pinus-echinata', 'quercus-alba'] })
        .expect(200);
      const changed = res.body as StudySetBody;
      expect(changed).to.include({ name: set.name, event: 'Spring meet', notes: null, shared: true, createdAt: set.createdAt });
      expect(changed.taxa.map((t) => t.id)).to.deep.equal(['quercus-rubra', 'pinus-echinata', 'quercus-alba']);
      expect(Date.parse(changed.updatedAt)).to.be.at.least(Date.parse(set.updatedAt));
      expect(await created.context.models.StudySetTaxon.count({ where: { studySetId: set.id } })).to.equal(3);
    });

    it('deletes a set with its species list', async () => {
      const set = await make(coach);
      await request(created.app).delete(`/api/v1/study-sets/${set.id}`).set(auth(coach)).expect(204);
      await request(created.app).get(`/api/v1/study-sets/${set.id}`).set(auth(coach)).expect(404);
      expect(await created.context.models.StudySetTaxon.count({ where: { studySetId: set.id } })).to.equal(0);
      await request(created.app).delete(`/api/v1/study-sets/${set.id}`).set(auth(coach)).expect(404);
    });
  });

  describe('checking the species list', () => {
    async function rejected(body: Record<string, unknown>): Promise<InvalidParams> {
      const sets = await setCount();
      const links = await linkCount();
      const res = await request(created.app)
        .post('/api/v1/study-sets')
        .set(auth(coach))
        .send({ name: 'Rejected', ...body })
        .expect(400);
      expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
      expect(await setCount(), 'no study set is written').to.equal(sets);
      expect(await linkCount(), 'no species link is written').to.equal(links);
      return res.body as InvalidParams;
    }

    it('names an unknown taxon by its place in the list', async () => {
      const body = await rejected({ taxa: ['pinus-taeda', 'quercus-imaginaria', 'acer-rubrum'] });
      expect(body['invalid-params']).to.deep.equal([{ name: '/taxa/1', reason: 'there is no taxon quercus-imaginaria in the matrix' }]);
    });

    it('names a species given twice, pointing at its first place', async () => {
      const body = await rejected({ taxa: ['pinus-taeda', 'quercus-alba', 'pinus-taeda'] });
      expect(body['invalid-params']).to.deep.equal([{ name: '/taxa/2', reason: 'pinus-taeda is already in the list at /taxa/0' }]);
    });

    it('names a retired taxon', async () => {
      const body = await rejected({ taxa: ['pinus-retiredensis'] });
      expect(body['invalid-params']).to.deep.equal([{ name: '/taxa/0', reason: 'pinus-retiredensis is retired from the matrix' }]);
    });

    it('names every problem at once', async () => {
      const body = await rejected({ taxa: ['no-such-tree', 'acer-rubrum', 'acer-rubrum', 'pinus-retiredensis'] });
      expect(body['invalid-params'].map((p) => p.name)).to.deep.equal(['/taxa/0', '/taxa/2', '/taxa/3']);
    });

    it('refuses an empty list and a list of more than 200', async () => {
      const empty = await rejected({ taxa: [] });
      expect(empty['invalid-params'].map((p) => p.name).join(' ')).to.include('taxa');
      const many = Array.from({ length: 201 }, (_, i) => `tree-${i}`);
      const tooMany = await rejected({ taxa: many });
      expect(tooMany['invalid-params'].map((p) => p.name).join(' ')).to.include('taxa');
    });

    it('refuses a blank name and a day that is not on the calendar', async () => {
      const blank = await rejected({ name: '   ', taxa: ['pinus-taeda'] });
      expect(blank['invalid-params']).to.deep.equal([{ name: '/name', reason: 'must not be blank' }]);
      const day = await rejected({ eventDate: '2027-02-30', taxa: ['pinus-taeda'] });
      expect(day['invalid-params'].map((p) => p.name).join(' ')).to.include('eventDate');
    });

    it('leaves the set as it was when a change brings a bad list', async () => {
      const set = await make(coach, { name: 'Unchanged' });
      const res = await request(created.app)
        .patch(`/api/v1/study-sets/${set.id}`)
        .set(auth(coach))
        .send({ name: 'Renamed', taxa: ['acer-rubrum', 'no-such-tree'] })
        .expect(400);
      expect(res.body['invalid-params']).to.deep.equal([{ name: '/taxa/1', reason: 'there is no taxon no-such-tree in the matrix' }]);
      const after = await request(created.app).get(`/api/v1/study-sets/${set.id}`).set(auth(coach)).expect(200);
      expect(after.body).to.deep.equal(set);
    });

    it('refuses a change that names no field', async () => {
      const set = await make(coach);
      await request(created.app).patch(`/api/v1/study-sets/${set.id}`).set(auth(coach)).send({}).expect(400);
    });
  });

  describe('who may see and change a set', () => {
    it('hides another coach’s unshared set: 404 to read, change or delete it', async () => {
      const set = await make(coach, { name: 'Private' });
      await request(created.app).get(`/api/v1/study-sets/${set.id}`).set(auth(otherCoach)).expect(404);
      await request(created.app).patch(`/api/v1/study-sets/${set.id}`).set(auth(otherCoach)).send({ name: 'Taken over' }).expect(404);
      await request(created.app).delete(`/api/v1/study-sets/${set.id}`).set(auth(otherCoach)).expect(404);
      await request(created.app).get(`/api/v1/study-sets/${set.id}`).set(auth(learner)).expect(404);
      const still = await request(created.app).get(`/api/v1/study-sets/${set.id}`).set(auth(coach)).expect(200);
      expect(still.body.name).to.equal('Private');
    });

    it('lets anyone signed in read a shared set, but only the owner or an admin change it', async () => {
      const set = await make(coach, { name: 'For the team', shared: true });
      const read = await request(created.app).get(`/api/v1/study-sets/${set.id}`).set(auth(learner)).expect(200);
      expect(read.body.taxa.map((t: Species) => t.id)).to.deep.equal(['pinus-taeda', 'quercus-alba']);
      await request(created.app).get(`/api/v1/study-sets/${set.id}`).set(auth(otherCoach)).expect(200);
      await request(created.app).patch(`/api/v1/study-sets/${set.id}`).set(auth(otherCoach)).send({ name: 'Taken over' }).expect(403);
      await request(created.app).delete(`/api/v1/study-sets/${set.id}`).set(auth(otherCoach)).expect(403);
      await request(created.app).patch(`/api/v1/study-sets/${set.id}`).set(auth(learner)).send({ name: 'Taken over' }).expect(403);
      await request(created.app).get(`/api/v1/study-sets/${set.id}`).expect(401);
    });

    it('lets an admin read, change and delete any set', async () => {
      const set = await make(otherCoach, { name: 'Admin checks' });
      await request(created.app).get(`/api/v1/study-sets/${set.id}`).set(auth(admin)).expect(200);
      const changed = await request(created.app).patch(`/api/v1/study-sets/${set.id}`).set(auth(admin)).send({ name: 'Checked' }).expect(200);
      expect(changed.body).to.include({ name: 'Checked', ownerId: otherCoach.userId });
      await request(created.app).delete(`/api/v1/study-sets/${set.id}`).set(auth(admin)).expect(204);
    });

    it('gives a set made by an admin to the admin', async () => {
      const set = await make(admin);
      expect(set.ownerId).to.equal(admin.userId);
    });

    it('refuses learners a list or a new set', async () => {
      await request(created.app).get('/api/v1/study-sets').set(auth(learner)).expect(403);
      const sets = await setCount();
      await request(created.app)
        .post('/api/v1/study-sets')
        .set(auth(learner))
        .send({ name: 'Mine', taxa: ['pinus-taeda'] })
        .expect(403);
      expect(await setCount()).to.equal(sets);
    });
  });

  describe('the demo scenario', () => {
    it('gives the club coach a shared set for the meet whose species are all in the matrix', async () => {
      const token = await signInDemo('coach');
      const list = await request(created.app).get('/api/v1/study-sets').set(auth(token)).expect(200);
      const demo = (list.body.studySets as StudySetBody[]).find((s) => s.name === DEMO_STUDY_SET.name);
      expect(demo, 'the demo coach owns the demo study set').to.not.equal(undefined);
      expect(demo).to.include({ event: DEMO_EVENT, shared: true, ownerName: DEMO_ACCOUNTS.find((a) => a.role === 'coach')?.displayName });
      expect(demo?.taxa.map((t) => t.id)).to.deep.equal([...DEMO_STUDY_SET.taxa]);
      expect(demo?.taxa.length).to.be.within(20, 30);
      expect(demo?.taxa.every((t) => !t.retired && t.scientificName.length > 0 && t.commonNames.length > 0)).to.equal(true);
      expect(demo?.taxa.find((t) => t.id === 'liriodendron-tulipifera')?.scientificName).to.equal('Liriodendron tulipifera');
      expect(demo?.taxa.find((t) => t.id === 'liquidambar-styraciflua')?.commonNames).to.include('sweetgum');

      const student = await signInDemo('learner');
      const read = await request(created.app).get(`/api/v1/study-sets/${demo?.id}`).set(auth(student)).expect(200);
      expect(read.body.taxa).to.have.length(DEMO_STUDY_SET.taxa.length);
    });

    it('reaches a database seeded before study sets existed when it next starts', async () => {
      const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'sylvasift-study-'));
      const env = { DATABASE_URL: `sqlite:${path.join(dir, 'older.sqlite')}` };
      try {
        const older = await startTestApp(env);
        // undo the study set seeder, as if the database predated it
        await createSeeder(older.context.sequelize, older.context.models, older.context.config).down({ to: '0003-demo-study-set' });
        expect(await older.context.models.StudySet.count()).to.equal(0);
        await older.close();

        const upgraded = await startTestApp(env);
        try {
          const sets = await upgraded.context.models.StudySet.findAll();
          expect(sets.map((s) => s.name)).to.deep.equal([DEMO_STUDY_SET.name]);
          expect(await upgraded.context.models.User.count(), 'the demo accounts are not seeded twice').to.equal(DEMO_ACCOUNTS.length);
        } finally {
          await upgraded.close();
        }
      } finally {
        fs.rmSync(dir, { recursive: true, force: true });
      }
    });

    it('is not added where the demo scenario is not seeded', async () => {
      const production = await startTestApp(PRODUCTION);
      try {
        expect(await production.context.models.StudySet.count()).to.equal(0);
      } finally {
        await production.close();
      }
    });
  });
});
