import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import sharp from 'sharp';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { signUpAndSignIn, type SignedInUser } from './support/accounts';
import { assertContractKept, startTestApp } from './support/test-app';

function binary(res: request.Response, done: (error: Error | null, body: Buffer) => void): void {
  const chunks: Buffer[] = [];
  res.on('data', (chunk: Buffer) => chunks.push(chunk));
  res.on('end', () => done(null, Buffer.concat(chunks)));
}

describe('api: taxon photos', () => {
  let created: CreatedApp;
  let curator: SignedInUser;
  let learner: SignedInUser;
  let photoWithGps: Buffer;

  before(async () => {
    created = await startTestApp();
    curator = await signUpAndSignIn(created, 'curator');
    learner = await signUpAndSignIn(created, 'learner');
    // A camera-like JPEG carrying EXIF with a camera make and a GPS position (IFD3 is the GPS IFD, EXIF 2.3).
    photoWithGps = await sharp({ create: { width: 320, height: 240, channels: 3, background: '#3a7d44' } })
      .jpeg()
      .withExif({
        IFD0: { Make: 'TestCam', Model: 'Field 1' },
        IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '35/1 46/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '78/1 38/1 0/1' },
      })
      .toBuffer();
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  const upload = (user: SignedInUser, taxonId: string, file: Buffer, name: string, fields: Record<string, string> = {}) => {
    const call = request(created.app).post(`/api/v1/taxa/${taxonId}/photos`).set('Authorization', `Bearer ${user.token}`);
    for (const [key, value] of Object.entries(fields)) call.field(key, value);
    return call.attach('photo', file, name);
  };

  it('checks that the test photo really carries EXIF and GPS', async () => {
    const metadata = await sharp(photoWithGps).metadata();
    expect(metadata.exif?.length ?? 0).to.be.greaterThan(0);
    expect(metadata.exif!.toString('latin1')).to.contain('TestCam');
  });

  it('re-encodes an upload as WebP with every piece of metadata dropped, and serves it with its type', async () => {
    const res = await upload(curator, 'pinus-taeda', photoWithGps, 'IMG_0001.jpg', { caption: 'Bark at breast height', credit: 'Test curator' }).expect(201);
    expect(res.body.url).to.match(/^\/api\/v1\/photos\/[0-9a-f]{32}\.webp$/);
    expect(res.body).to.deep.include({ mediaType: 'image/webp', width: 320, height: 240, caption: 'Bark at breast height' });
    const served = await request(created.app).get(res.body.url).buffer(true).parse(binary).expect(200);
    expect(served.headers['content-type']).to.equal('image/webp');
    const metadata = await sharp(served.body as Buffer).metadata();
    expect(metadata.format).to.equal('webp');
    expect(metadata.exif).to.equal(undefined);
    expect((served.body as Buffer).toString('latin1')).to.not.contain('TestCam');
    const page = await request(created.app).get('/api/v1/taxa/pinus-taeda').expect(200);
    expect(page.body.photos.map((p: { url: string }) => p.url)).to.include(res.body.url);
    const stored = fs.readdirSync(created.context.config.storage.uploadsDir);
    expect(stored).to.include(path.basename(res.body.url));
  });

  it('judges the type by content: a PNG named .txt is accepted, text named .jpg is refused with 415', async () => {
    const png = await sharp({ create: { width: 10, height: 10, channels: 3, background: '#ffffff' } })
      .png()
      .toBuffer();
    const ok = await upload(curator, 'pinus-taeda', png, 'notes.txt', { format: 'jpeg' }).expect(201);
    expect(ok.body.mediaType).to.equal('image/jpeg');
    const before = await created.context.models.Photo.count();
    const res = await upload(curator, 'pinus-taeda', Buffer.from('this is not an image at all'), 'pine.jpg').expect(415);
    expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
    expect(await created.context.models.Photo.count()).to.equal(before);
  });

  it('refuses a file over 8 MB with 413 and writes nothing', async () => {
    const before = await created.context.models.Photo.count();
    const res = await upload(curator, 'pinus-taeda', Buffer.alloc(8 * 1024 * 1024 + 1, 0xff), 'huge.jpg').expect(413);
    expect(res.body.type).to.match(/\/problems\/payload-too-large$/);
    expect(await created.context.models.Photo.count()).to.equal(before);
  });

  it('needs a curator and an existing taxon', async () => {
    await upload(learner, 'pinus-taeda', photoWithGps, 'a.jpg').expect(403);
    await request(created.app).post('/api/v1/taxa/pinus-taeda/photos').attach('photo', photoWithGps, 'a.jpg').expect(401);
    await upload(curator, 'pinus-nonexistens', photoWithGps, 'a.jpg').expect(404);
  });

  it('rejects path traversal and names it did not give out', async () => {
    await request(created.app).get('/api/v1/photos/..%2F..%2Fetc%2Fpasswd').expect(400);
    await request(created.app).get('/api/v1/photos/../../package.json').expect(404);
    await request(created.app)
      .get(`/api/v1/photos/${'0'.repeat(32)}.webp`)
      .expect(404);
  });
});
