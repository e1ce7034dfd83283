import { expect } from 'chai';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { assertContractKept, startTestApp } from './support/test-app';
import { signUpAndSignIn, type SignedInUser } from './support/accounts';

interface Captured {
  envelope: { to: string[] };
  subject: string;
  text: string;
}

const TAXON = 'pinus-taeda';
const TRAIT = 'needles-per-fascicle';

describe('api: queries on doubtful cells', () => {
  let created: CreatedApp;
  let learner: SignedInUser;
  let reviewer: SignedInUser;
  let otherReviewer: SignedInUser;
  let coach: SignedInUser;

  const auth = (user: SignedInUser) => ({ Authorization: `Bearer ${user.token}` });
  const mailFor = (address: string) => (created.context.mailer.captured ?? []).filter((m: Captured) => m.envelope.to.includes(address));

  before(async () => {
    created = await startTestApp();
    learner = await signUpAndSignIn(created, 'learner');
    reviewer = await signUpAndSignIn(created, 'reviewer');
    otherReviewer = await signUpAndSignIn(created, 'reviewer');
    coach = await signUpAndSignIn(created, 'coach');
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  async function raise(by: SignedInUser, note = 'Saw bundles of two on a young tree by the road.') {
    const res = await request(created.app).post('/api/v1/queries').set(auth(by)).send({ taxonId: TAXON, traitCode: TRAIT, note }).expect(201);
    return res.body as { id: number; state: string };
  }

  it('goes open → answered → settled, mailing the raiser and the reviewers at each step', async () => {
    const raisedBefore = mailFor(reviewer.email).length;
    const query = await raise(learner);
    expect(query.state).to.equal('open');
    expect(mailFor(reviewer.email).length).to.equal(raisedBefore + 1);
    expect(mailFor(otherReviewer.email).at(-1)?.subject).to.include(`Query ${query.id}`).and.to.include('raised');

    const queue = await request(created.app).get('/api/v1/queries').query({ state: 'open' }).set(auth(reviewer)).expect(200);
    expect(queue.body.queries.map((q: { id: number }) => q.id)).to.include(query.id);

    const learnerMail = mailFor(learner.email).length;
    const answered = await request(created.app)
      .post(`/api/v1/queries/${query.id}/answer`)
      .set(auth(reviewer))
      .send({ answer: 'Loblolly bundles are threes; twos turn up now and then on young trees.', evidence: 'Checked against a regional silvics handbook.' })
      .expect(200);
    expect(answered.body).to.include({ state: 'answered', answeredBy: reviewer.userId });
    expect(mailFor(learner.email).length).to.equal(learnerMail + 1);
    expect(mailFor(learner.email).at(-1)?.text).to.include('Evidence: Checked against a regional silvics handbook.');
    // the reviewer who acted is not mailed about their own change; the other one is
    expect(mailFor(otherReviewer.email).at(-1)?.subject).to.include('answered');

    const settled = await request(created.app).post(`/api/v1/queries/${query.id}/settle`).set(auth(otherReviewer)).send({ note: 'Agreed.' }).expect(200);
    expect(settled.body).to.include({ state: 'settled', outcome: 'kept', settledBy: otherReviewer.userId });
    expect(settled.body.history.map((h: { action: string }) => h.action)).to.deep.equal(['raised', 'answered', 'settled']);
    expect(mailFor(learner.email).at(-1)?.subject).to.include('settled');

    await request(created.app).post(`/api/v1/queries/${query.id}/answer`).set(auth(reviewer)).send({ answer: 'Too late for this.' }).expect(409);
    await request(created.app).post(`/api/v1/queries/${query.id}/settle`).set(auth(reviewer)).send({}).expect(409);
  });

  it('cannot settle an open query without an answer', async () => {
    const query = await raise(learner);
    await request(created.app).post(`/api/v1/queries/${query.id}/settle`).set(auth(reviewer)).send({}).expect(409);
  });

  it('recodes the cell with the version read, and refuses a stale version without writing', async () => {
    const query = await raise(coach, 'Twos are common on this species in our county.');
    const cellBefore = await created.context.models.Cell.findOne({ where: { taxonId: TAXON, traitCode: TRAIT } });
    expect(cellBefore, 'the seeded matrix codes needles per fascicle for loblolly pine').to.not.equal(null);
    const version = cellBefore?.version ?? 0;
    const value = { usual: [3], occasional: [2] };

    const stale = await request(created.app)
      .post(`/api/v1/queries/${query.id}/recode`)
      .set(auth(reviewer))
      .send({ value, version: version + 5, reason: 'Twos are occasional.' })
      .expect(409);
    expect(stale.body.current.version).to.equal(version);
    const unchanged = await created.context.models.Cell.findOne({ where: { taxonId: TAXON, traitCode: TRAIT } });
    expect(unchanged?.version).to.equal(version);
    const stillOpen = await request(created.app).get(`/api/v1/queries/${query.id}`).set(auth(reviewer)).expect(200);
    expect(stillOpen.body.state).to.equal('open');

    const res = await request(created.app)
      .post(`/api/v1/queries/${query.id}/recode`)
      .set(auth(reviewer))
      .send({ value, version, reason: 'Twos are occasional.' })
      .expect(200);
    expect(res.body.query).to.include({ state: 'settled', outcome: 'recoded' });
    expect(res.body.cell.version).to.equal(version + 1);
    const after = await created.context.models.Cell.findOne({ where: { taxonId: TAXON, traitCode: TRAIT } });
    expect(after?.value).to.deep.equal(value);
    expect(after?.version).to.equal(version + 1);
  });

  it('gives reviewers the queried cell with its version, so a recode can name it first time', async () => {
    const query = await raise(learner, 'Are threes really the usual count here?');
    const stored = await created.context.models.Cell.findOne({ where: { taxonId: TAXON, traitCode: TRAIT } });
    const res = await request(created.app).get(`/api/v1/queries/${query.id}/cell`).set(auth(reviewer)).expect(200);
    expect(res.body).to.deep.equal({ taxonId: TAXON, traitCode: TRAIT, value: stored?.value, version: stored?.version });
    expect(res.headers['cache-control']).to.equal('no-store');
    // the raiser (a learner) may read the query, not the unpublished working cell
    await request(created.app).get(`/api/v1/queries/${query.id}/cell`).set(auth(learner)).expect(403);
    await request(created.app).get('/api/v1/queries/999999/cell').set(auth(reviewer)).expect(404);
    const recoded = await request(created.app)
      .post(`/api/v1/queries/${query.id}/recode`)
      .set(auth(reviewer))
      .send({ value: res.body.value, version: res.body.version, reason: 'Read and kept as it was, through a recode.' })
      .expect(200);
    expect(recoded.body.cell.version).to.equal((stored?.version ?? 0) + 1);
  });

  it('refuses a query on a cell that does not exist', async () => {
    const res = await request(created.app)
      .post('/api/v1/queries')
      .set(auth(learner))
      .send({ taxonId: 'no-such-tree', traitCode: TRAIT, note: 'Hmm, odd.' })
      .expect(400);
    expect(res.body['invalid-params'][0].name).to.equal('/taxonId');
  });

  it('shows non-reviewers only their own queries; reviewers see all', async () => {
    const mine = await raise(learner);
    const theirs = await raise(coach);
    const forLearner = await request(created.app).get('/api/v1/queries').set(auth(learner)).expect(200);
    const ids = forLearner.body.queries.map((q: { id: number }) => q.id);
    expect(ids).to.include(mine.id).and.not.to.include(theirs.id);
    await request(created.app).get(`/api/v1/queries/${theirs.id}`).set(auth(learner)).expect(404);
    await request(created.app).get(`/api/v1/queries/${theirs.id}`).set(auth(reviewer)).expect(200);
    await request(created.app).post(`/api/v1/queries/${theirs.id}/answer`).set(auth(learner)).send({ answer: 'I answer myself.' }).expect(403);
  });
});
