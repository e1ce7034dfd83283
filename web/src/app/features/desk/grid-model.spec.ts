import { expect } from 'chai';
import type { Trait } from '@shared/engine';
import { changeRow, changesCsv } from './change-log';
import { cellView, cellWords, columnWindow, filterColumns, movedTo, orderColumns, partSegments, rangeText } from './grid-model';

const trait = (code: string, part: Trait['part'], extra: Partial<Trait> = {}): Trait => ({
  code,
  label: code.replace(/-/g, ' '),
  part,
  kind: 'state',
  season: 'any',
  ease: 1,
  errorRate: 0.05,
  ...extra,
});

// Bark words for shagbark hickory, Carya ovata: grey bark that peels in long loose plates (from memory
// of the common field-guide description; common practice, no source for the frequencies).
const BARK = trait('bark-texture', 'bark', {
  values: [
    { code: 'plated', label: 'Plated' },
    { code: 'furrowed', label: 'Furrowed' },
    { code: 'smooth', label: 'Smooth' },
  ],
});
const NEEDLE_LENGTH = trait('needle-length', 'needle', { kind: 'numeric', unit: 'cm' });

describe('web: the Matrix desk grid model', () => {
  it("groups the columns by plant part in the product's part order, keeping the matrix order inside a part", () => {
    const columns = orderColumns([BARK, trait('leaf-a', 'leaf'), NEEDLE_LENGTH, trait('leaf-b', 'leaf')]);
    expect(columns.map((column) => column.trait.code)).to.deep.equal(['leaf-a', 'leaf-b', 'needle-length', 'bark-texture']);
    expect(columns.map((column) => column.position)).to.deep.equal([1, 3, 2, 0]);
    expect(partSegments(columns, 1, 4)).to.deep.equal([
      { part: 'leaf', label: 'Leaf', start: 1, count: 1 },
      { part: 'needle', label: 'Needle', start: 2, count: 1 },
      { part: 'bark', label: 'Bark', start: 3, count: 1 },
    ]);
    expect(filterColumns(columns, ['bark'], '').map((column) => column.trait.code)).to.deep.equal(['bark-texture']);
    expect(filterColumns(columns, [], 'NEEDLE').map((column) => column.trait.code)).to.deep.equal(['needle-length']);
  });

  it('draws only the columns in view plus an overscan, never past either end', () => {
    // 152 px columns, 1048 px visible: columns 0–6 are in view at the left edge
    expect(columnWindow(0, 1048, 152, 200)).to.deep.equal({ first: 0, last: 9 });
    expect(columnWindow(152 * 50 + 10, 1048, 152, 200)).to.deep.equal({ first: 48, last: 59 });
    expect(columnWindow(152 * 199, 1048, 152, 200)).to.deep.equal({ first: 197, last: 200 });
    expect(columnWindow(0, 1048, 152, 0)).to.deep.equal({ first: 0, last: 0 });
  });

  it('writes a range as min (low–high) max with the unit, and says it in words', () => {
    // loblolly pine needles 10 (12–23) 23 cm, the seeded value (Flora of North America vol. 2 gives 12–23 cm)
    expect(rangeText({ min: 10, low: 12, high: 23, max: 23 }, 'cm')).to.equal('10 (12–23) 23 cm');
    const [column] = orderColumns([NEEDLE_LENGTH]);
    expect(cellWords(column!.trait, { min: 10, low: 12, high: 23, max: 23 })).to.equal('typically 12–23 cm, recorded 10–23 cm');
  });

  it('marks each value with how often it is seen, and tells unknown from inapplicable', () => {
    const [column] = orderColumns([BARK]);
    const view = cellView(column!, { usual: ['plated'], occasional: ['furrowed'], rare: ['smooth'] });
    expect(view).to.deep.equal({
      kind: 'values',
      values: [
        { label: 'Plated', frequency: 'usual' },
        { label: 'Furrowed', frequency: 'occasional' },
        { label: 'Smooth', frequency: 'rare' },
      ],
      words: 'usually plated, occasionally furrowed, rarely smooth',
    });
    expect(cellView(column!, 'unknown')).to.deep.equal({ kind: 'unknown', words: 'not coded' });
    expect(cellView(column!, undefined)).to.deep.equal({ kind: 'unknown', words: 'not coded' });
    expect(cellView(column!, 'inapplicable')).to.deep.equal({ kind: 'inapplicable', words: 'not applicable' });
  });

  it('moves the active cell with the keys, clamped to the grid', () => {
    const size = { rows: 10, columns: 5, pageRows: 4 };
    expect(movedTo('ArrowRight', { row: 0, column: 4 }, size)).to.deep.equal({ row: 0, column: 4 });
    expect(movedTo('ArrowDown', { row: 2, column: 1 }, size)).to.deep.equal({ row: 3, column: 1 });
    expect(movedTo('ArrowUp', { row: 0, column: 1 }, size)).to.deep.equal({ row: 0, column: 1 });
    expect(movedTo('PageDown', { row: 8, column: 1 }, size)).to.deep.equal({ row: 9, column: 1 });
    expect(movedTo('End', { row: 3, column: 1 }, size, true)).to.deep.equal({ row: 9, column: 4 });
    expect(movedTo('Home', { row: 3, column: 3 }, size)).to.deep.equal({ row: 3, column: 0 });
    expect(movedTo('a', { row: 3, column: 3 }, size)).to.equal(null);
  });

  it('exports the change log as CSV: commas and quotes quoted (RFC 4180), a formula-like field led by an apostrophe (OWASP, CSV injection)', () => {
    const row = changeRow({
      id: 7,
      actor: { userId: 2, email: 'harriet@example.invalid' },
      at: '2026-12-04T10:00:00.000Z',
      entity: 'cell',
      entityKey: 'pinus-taeda/needle-length',
      action: 'set',
      before: { min: 10, low: 12, high: 23, max: 23 },
      after: 'unknown',
      reason: '=HYPERLINK("x"), checked "twice"',
    });
    expect(row).to.include({ taxon: 'pinus-taeda', trait: 'needle-length', before: 'typically 12–23 cm, recorded 10–23 cm', after: 'not coded' });
    const [header, line] = changesCsv([row]).split('\r\n');
    expect(header).to.equal('when,who,what,taxon,trait,before,after,reason');
    expect(line).to.equal(
      `2026-12-04T10:00:00.000Z,harriet@example.invalid,cell,pinus-taeda,needle-length,"typically 12–23 cm, recorded 10–23 cm",not coded,"'=HYPERLINK(""x""), checked ""twice"""`,
    );
  });
});
