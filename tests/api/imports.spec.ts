import { expect } from 'chai';
import ExcelJS from 'exceljs';
import request from 'supertest';
import type { CreatedApp } from '../../api/src/app';
import { signUpAndSignIn, type SignedInUser } from './support/accounts';
import { assertContractKept, startTestApp } from './support/test-app';

const IMPORTS = '/api/v1/curation/imports';
const HEADER = 'taxon,trait,usual,occasional,rare,min,low,high,max,state';

/** A CSV sheet from its data lines, header first. */
const sheet = (...lines: string[]) => [HEADER, ...lines].join('\r\n') + '\r\n';

/**
 * Facts coded below (from memory): loblolly pine bears its needles in bundles of 3, sometimes 2,
 * 12–23 cm long (Flora of North America vol. 2); eastern white pine in bundles of 5
 * (Flora of North America vol. 2). Pine twigs have continuous pith: common practice, no source.
 */
const GOOD_SHEET = sheet(
  'pinus-taeda,needles-per-fascicle,3,2,,,,,,',
  'pinus-taeda,needle-length,,,,10,12,23,25,',
  'pinus-taeda,pith,continuous,,,,,,,',
  // RFC 4180 (CSV): quoted fields may contain commas and doubled quotes; order within a list does not matter
  '"pinus-taeda","bark-texture","scaly;plated","furrowed; blocky",,,,,,',
  'pinus-strobus,needles-per-fascicle,5,,,,,,,',
  'pinus-strobus,pith,,,,,,,,unknown',
);

describe('api: matrix import (CSV / XLSX, dry run then apply)', () => {
  let created: CreatedApp;
  let curator: SignedInUser;
  let admin: SignedInUser;
  let learner: SignedInUser;

  before(async () => {
    created = await startTestApp();
    curator = await signUpAndSignIn(created, 'curator');
    admin = await signUpAndSignIn(created, 'admin');
    learner = await signUpAndSignIn(created, 'learner');
  });
  afterEach(() => assertContractKept(created));
  after(() => created.close());

  const upload = (user: SignedInUser | undefined, mode: 'dry-run' | 'apply', content: string | Buffer, name = 'loblolly.csv') => {
    const req = request(created.app).post(IMPORTS).query({ mode });
    if (user) req.set('Authorization', `Bearer ${user.token}`);
    return req.attach('file', typeof content === 'string' ? Buffer.from(content, 'utf8') : content, name);
  };
  /** Every cell of the working matrix with its version, and the audit log's length. */
  const snapshot = async () => ({
    cells: (await created.context.models.Cell.findAll({ order: [['id', 'ASC']] })).map((row) => ({
      taxonId: row.taxonId,
      traitCode: row.traitCode,
      value: row.value,
      version: row.version,
    })),
    audit: await created.context.models.AuditEntry.count(),
  });
  const storedCell = async (taxonId: string, traitCode: string) => {
    const row = await created.context.models.Cell.findOne({ where: { taxonId, traitCode } });
    return row ? { value: row.value, version: row.version } : undefined;
  };

  describe('who may import', () => {
    it('needs a signed-in curator: 401 anonymous, 403 learner; an admin passes', async () => {
      const before = await snapshot();
      await upload(undefined, 'apply', GOOD_SHEET).expect(401);
      const refused = await upload(learner, 'apply', GOOD_SHEET).expect(403);
      expect(refused.body.type).to.match(/\/problems\/forbidden$/);
      expect(await snapshot()).to.deep.equal(before);
      const dryRun = await upload(admin, 'dry-run', GOOD_SHEET).expect(200);
      expect(dryRun.body.problems).to.deep.equal([]);
    });
  });

  describe('dry run', () => {
    it('shows exactly the cells that would change, counts the rest as unchanged, and writes nothing', async () => {
      const before = await snapshot();
      const res = await upload(curator, 'dry-run', GOOD_SHEET).expect(200);
      expect(res.headers['cache-control']).to.equal('no-store');
      expect(res.body).to.deep.equal({
        mode: 'dry-run',
        file: 'loblolly.csv',
        rows: 6,
        changes: [
          {
            row: 3,
            taxon: 'pinus-taeda',
            trait: 'needle-length',
            before: { min: 10, low: 15, high: 23, max: 23 },
            after: { min: 10, low: 12, high: 23, max: 25 },
          },
          { row: 7, taxon: 'pinus-strobus', trait: 'pith', before: { usual: ['continuous'] }, after: 'unknown' },
        ],
        unchanged: 4,
        problems: [],
      });
      expect(await snapshot()).to.deep.equal(before);
    });

    it('is the default mode', async () => {
      const before = await snapshot();
      const res = await request(created.app)
        .post(IMPORTS)
        .set('Authorization', `Bearer ${curator.token}`)
        .attach('file', Buffer.from(GOOD_SHEET), 'loblolly.csv')
        .expect(200);
      expect(res.body.mode).to.equal('dry-run');
      expect(res.body.changes).to.have.length(2);
      expect(await snapshot()).to.deep.equal(before);
    });

    it('names the row and column of every problem', async () => {
      const res = await upload(
        curator,
        'dry-run',
        sheet(
          'pinus-tada,needle-length,,,,10,12,23,25,', // 2: unknown taxon
          'pinus-taeda,needle-count,3,,,,,,,', // 3: unknown trait
          'pinus-taeda,leaf-arrangement,spiral,,,,,,,', // 4: unknown value code
          'pinus-taeda,cone-length,,,,6,9,8,15,', // 5: low > high
          'pinus-taeda,cone-length,,,,6,6,15,15,', // 6: same cell as row 5
          'pinus-taeda,needle-length,12,,,,,,,', // 7: values on a numeric trait
          'pinus-taeda,needles-per-fascicle,2.5,,,,,,,', // 8: not a whole count
          'pinus-taeda,crown-form,excurrent,,,,,,,sometimes', // 9: a state that is neither unknown nor inapplicable
          'pinus-taeda,fall-color,,,,,,,,inapplicable', // 10: fine
        ),
      ).expect(200);
      const where = (res.body.problems as Array<{ row: number; column: string | null }>).map((p) => `${p.row}:${p.column}`);
      expect(where).to.deep.equal(['2:taxon', '3:trait', '4:usual', '5:high', '6:trait', '7:usual', '8:usual', '9:state']);
      const messages = (res.body.problems as Array<{ message: string }>).map((p) => p.message);
      expect(messages[0]).to.contain('pinus-tada');
      expect(messages[2]).to.contain('"spiral"');
      expect(messages[4]).to.contain('Row 5');
      expect(res.body.changes).to.deep.equal([{ row: 10, taxon: 'pinus-taeda', trait: 'fall-color', before: { usual: ['none'] }, after: 'inapplicable' }]);
    });

    it('reads a CSV that starts with a UTF-8 byte-order mark, as spreadsheet programs often write it', async () => {
      // Unicode Standard ch. 23.8: U+FEFF at the start of a UTF-8 stream is a byte-order mark, not text
      const withBom = Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(sheet('pinus-taeda,pith,continuous,,,,,,,'))]);
      const res = await upload(curator, 'dry-run', withBom).expect(200);
      expect(res.body.problems).to.deep.equal([]);
      expect(res.body.rows).to.equal(1);
    });

    it('refuses text that is not UTF-8 as a problem at row 1', async () => {
      const latin1 = Buffer.from(sheet('pinus-taeda,pith,continuous,,,,,,,') + 'caf\u00e9', 'latin1');
      const res = await upload(curator, 'dry-run', latin1).expect(200);
      expect(res.body.problems).to.have.length(1);
      expect(res.body.problems[0]).to.deep.include({ row: 1, column: null });
      expect(res.body.problems[0].message).to.contain('UTF-8');
    });

    it('reports a header without all the layout columns at row 1', async () => {
      const res = await upload(curator, 'dry-run', 'taxon,trait,usual,occasional,rare,min,low,high,max\r\npinus-taeda,pith,continuous,,,,,,\r\n').expect(200);
      expect(res.body.problems).to.deep.equal([{ row: 1, column: 'state', message: 'The header has no "state" column.' }]);
      expect(res.body.changes).to.deep.equal([]);
    });

    it('treats path-like and SQL-looking text in cells as unknown codes and nothing more', async () => {
      const before = await snapshot();
      const res = await upload(
        curator,
        'dry-run',
        sheet(
          `"pinus-taeda'; DROP TABLE cells; --",pith,continuous,,,,,,,`,
          'pinus-taeda,../../etc/passwd,continuous,,,,,,,',
          `pinus-taeda,pith,"x"" OR ""1""=""1",,,,,,,`,
        ),
      ).expect(200);
      expect(res.body.problems.map((p: { row: number; column: string }) => `${p.row}:${p.column}`)).to.deep.equal(['2:taxon', '3:trait', '4:usual']);
      expect(res.body.problems[0].message).to.contain(`pinus-taeda'; DROP TABLE cells; --`);
      expect(res.body.problems[2].message).to.contain('x\\" OR \\"1\\"=\\"1');
      expect(await snapshot()).to.deep.equal(before);
      expect(before.cells.length).to.be.greaterThan(0);
    });
  });

  describe('apply', () => {
    it('writes exactly the changed cells, bumps their versions and audits each with the file name', async () => {
      const before = await snapshot();
      const needleLength = await storedCell('pinus-taeda', 'needle-length');
      const bundles = await storedCell('pinus-taeda', 'needles-per-fascicle');
      const pith = await storedCell('pinus-strobus', 'pith');
      const res = await upload(curator, 'apply', GOOD_SHEET).expect(200);
      expect(res.body.mode).to.equal('apply');
      expect(res.body.changes.map((c: { taxon: string; trait: string }) => `${c.taxon}/${c.trait}`)).to.deep.equal([
        'pinus-taeda/needle-length',
        'pinus-strobus/pith',
      ]);

      expect(await storedCell('pinus-taeda', 'needle-length')).to.deep.equal({
        value: { min: 10, low: 12, high: 23, max: 25 },
        version: needleLength!.version + 1,
      });
      expect(await storedCell('pinus-strobus', 'pith')).to.deep.equal({ value: 'unknown', version: (pith?.version ?? 0) + 1 });
      expect(await storedCell('pinus-taeda', 'needles-per-fascicle')).to.deep.equal(bundles);

      const after = await snapshot();
      const changedKeys = after.cells
        .filter((cell) => {
          const old = before.cells.find((b) => b.taxonId === cell.taxonId && b.traitCode === cell.traitCode);
          return !old || old.version !== cell.version;
        })
        .map((cell) => `${cell.taxonId}/${cell.traitCode}`);
      expect(changedKeys.sort()).to.deep.equal(['pinus-strobus/pith', 'pinus-taeda/needle-length']);
      expect(after.audit).to.equal(before.audit + 3);

      const audit = await request(created.app)
        .get('/api/v1/curation/audit')
        .set('Authorization', `Bearer ${curator.token}`)
        .query({ entity: 'cell', key: 'pinus-taeda/needle-length' })
        .expect(200);
      expect(audit.body.entries[0]).to.deep.include({
        action: 'set',
        reason: 'import loblolly.csv',
        before: { min: 10, low: 15, high: 23, max: 23 },
        after: { min: 10, low: 12, high: 23, max: 25 },
      });
      expect(audit.body.entries[0].actor).to.deep.equal({ userId: curator.userId, email: curator.email });
      const summary = await request(created.app)
        .get('/api/v1/curation/audit')
        .set('Authorization', `Bearer ${curator.token}`)
        .query({ entity: 'import' })
        .expect(200);
      expect(summary.body.entries[0]).to.deep.include({
        entityKey: 'loblolly.csv',
        reason: 'import loblolly.csv',
        after: { rows: 6, changed: 2, unchanged: 4 },
      });

      const again = await upload(curator, 'dry-run', GOOD_SHEET).expect(200);
      expect(again.body.changes).to.deep.equal([]);
      expect(again.body.unchanged).to.equal(6);
    });

    it('refuses a sheet with one bad row with 422 listing it, and writes nothing at all', async () => {
      const before = await snapshot();
      const res = await upload(
        curator,
        'apply',
        sheet(
          'pinus-echinata,pith,continuous,,,,,,,',
          'pinus-echinata,leaf-arrangement,alternate;spiral-ish,,,,,,,',
          'pinus-echinata,needle-length,,,,7,7,12.5,14,',
        ),
      ).expect(422);
      expect(res.headers['content-type']).to.match(/^application\/problem\+json/);
      expect(res.body.type).to.match(/\/problems\/import-invalid$/);
      expect(res.body.problems).to.have.length(1);
      expect(res.body.problems[0]).to.deep.include({ row: 3, column: 'usual' });
      expect(res.body.detail).to.contain('spiral-ish');
      expect(await snapshot()).to.deep.equal(before);
    });

    it('refuses a malformed CSV (an unterminated quote) naming the row, and writes nothing', async () => {
      const before = await snapshot();
      const broken = sheet(
        'pinus-echinata,pith,continuous,,,,,,,',
        'pinus-echinata,"needle-length,,,,7,7,12.5,14,',
        'pinus-echinata,fall-color,,,,,,,,unknown',
      );
      const dryRun = await upload(curator, 'dry-run', broken).expect(200);
      expect(dryRun.body.problems).to.have.length(1);
      expect(dryRun.body.problems[0]).to.deep.include({ row: 3, column: null });
      expect(dryRun.body.problems[0].message).to.match(/unterminated/i);
      const res = await upload(curator, 'apply', broken).expect(422);
      expect(res.body.problems[0].row).to.equal(3);
      expect(await snapshot()).to.deep.equal(before);
    });

    it('reads an XLSX workbook (judged by its content, whatever its name) and applies it', async () => {
      const workbook = new ExcelJS.Workbook();
      const worksheet = workbook.addWorksheet('cells');
      worksheet.addRow(HEADER.split(','));
      // numbers stay numbers in a spreadsheet: the reader must take them as the cell's text
      worksheet.addRow(['pinus-echinata', 'needle-length', null, null, null, 7, 7.5, 12.5, 13, null]);
      worksheet.addRow(['pinus-echinata', 'needles-per-fascicle', '2;3', null, null, null, null, null, null, null]);
      worksheet.addRow(['pinus-echinata', 'cone-length', null, null, null, 4, 4, 6, 7.5, null]);
      const xlsx = Buffer.from(await workbook.xlsx.writeBuffer());
      expect(xlsx.subarray(0, 4).toString('latin1')).to.equal('PK\u0003\u0004');

      const dryRun = await upload(curator, 'dry-run', xlsx, 'shortleaf.csv').expect(200);
      expect(dryRun.body).to.deep.include({ rows: 3, unchanged: 2, problems: [] });
      expect(dryRun.body.changes).to.deep.equal([
        { row: 4, taxon: 'pinus-echinata', trait: 'cone-length', before: { min: 4, low: 4, high: 6, max: 7 }, after: { min: 4, low: 4, high: 6, max: 7.5 } },
      ]);
      await upload(curator, 'apply', xlsx, 'shortleaf.xlsx').expect(200);
      expect((await storedCell('pinus-echinata', 'cone-length'))?.value).to.deep.equal({ min: 4, low: 4, high: 6, max: 7.5 });
    });

    it('refuses a file that starts like a ZIP but is no workbook, naming row 1, and writes nothing', async () => {
      const before = await snapshot();
      const fake = Buffer.concat([Buffer.from([0x50, 0x4b, 0x03, 0x04]), Buffer.from('taxon,trait\r\nnot really a workbook')]);
      const res = await upload(curator, 'apply', fake, 'cells.xlsx').expect(422);
      expect(res.body.problems).to.deep.equal([{ row: 1, column: null, message: 'The file starts like an XLSX workbook but could not be read as one.' }]);
      expect(await snapshot()).to.deep.equal(before);
    });

    it('refuses a sheet over 2 MB with 413 and writes nothing', async () => {
      const before = await snapshot();
      const line = 'pinus-taeda,pith,continuous,,,,,,,\r\n';
      const big = HEADER + '\r\n' + line.repeat(Math.ceil((2 * 1024 * 1024) / line.length) + 10);
      const res = await upload(curator, 'apply', big).expect(413);
      expect(res.body.type).to.match(/\/problems\/payload-too-large$/);
      expect(await snapshot()).to.deep.equal(before);
    });

    it('answers 400 when no file is sent', async () => {
      const res = await request(created.app)
        .post(IMPORTS)
        .query({ mode: 'apply' })
        .set('Authorization', `Bearer ${curator.token}`)
        .field('note', 'no file')
        .expect(400);
      expect(res.body.type).to.match(/\/problems\/invalid-input$/);
    });
  });
});
