import { expect } from 'chai';
import {
  answerLabel,
  cellInBrief,
  cellInWords,
  commonName,
  compileMatrix,
  GENERAL_CAUTIONS,
  isDiscreteCell,
  isInapplicableCell,
  isNumericCell,
  isUnknownCell,
  PART_LABELS,
  PLANT_PARTS,
  seededRandom,
  shuffled,
  visibleInSeason,
  type Cell,
} from '@shared/engine';
import { loadReferenceMatrix } from '../../seeds/load-matrix';

// The product's own words and rules, one home for every tier (no outside source: these are the
// wording the API and the pages show, and the browser suites read the same strings off the pages).
describe('engine: the domain words every tier shares', () => {
  const compiled = compileMatrix(loadReferenceMatrix());
  const traitOf = (code: string) => compiled.traits[compiled.traitIndexByCode.get(code)!]!;
  const bark = traitOf('bark-texture');
  const needleLength = traitOf('needle-length');
  const bark3: Cell = { usual: ['furrowed'], occasional: ['smooth'], rare: ['plated'] };

  it('writes a cell in the sentence form and the table form from the same labels', () => {
    expect(cellInWords(bark, bark3)).to.equal('usually deeply furrowed, occasionally smooth, rarely plated');
    expect(cellInBrief(bark, bark3)).to.equal('Deeply furrowed; occasionally smooth; rarely plated');
    expect(cellInBrief(bark, { usual: ['smooth', 'furrowed'] })).to.equal('Smooth, deeply furrowed');
    expect(cellInBrief(bark, { occasional: ['smooth'] })).to.equal('Occasionally smooth');
  });

  it('gives the recorded range only where it is wider than the typical one', () => {
    expect(cellInWords(needleLength, { min: 10, low: 12, high: 23, max: 23 })).to.equal('typically 12–23 cm, recorded 10–23 cm');
    expect(cellInWords(needleLength, { min: 12, low: 12, high: 18, max: 18 })).to.equal('typically 12–18 cm');
    expect(cellInBrief(needleLength, { min: 10, low: 12, high: 23, max: 23 })).to.equal('12–23 cm (10–23)');
    expect(cellInBrief(needleLength, { min: 7.5, low: 7.5, high: 7.5, max: 7.5 })).to.equal('7.5 cm');
  });

  it('says the same for a cell not coded or not applicable in both forms', () => {
    for (const words of [cellInWords, cellInBrief]) {
      expect(words(bark, 'unknown')).to.equal('not coded');
      expect(words(bark, 'inapplicable')).to.equal('not applicable');
    }
  });

  it('labels a document trait as it labels the compiled one, and shows an unlabelled value as itself', () => {
    const documentBark = loadReferenceMatrix().traits.find((trait) => trait.code === 'bark-texture')!;
    expect(cellInWords(documentBark, bark3)).to.equal(cellInWords(bark, bark3));
    expect(answerLabel(bark, 'furrowed')).to.equal('Deeply furrowed');
    expect(answerLabel(bark, 'no-such-value')).to.equal('no-such-value');
  });

  it('tells each cell shape apart, and a missing cell from all of them', () => {
    const cells: Array<Cell | undefined> = ['unknown', 'inapplicable', { min: 1, low: 2, high: 3, max: 4 }, { usual: ['smooth'] }, undefined];
    const shapes = cells.map((cell) => [isUnknownCell, isInapplicableCell, isNumericCell, isDiscreteCell].map((guard) => guard(cell)));
    expect(shapes).to.deep.equal([
      [true, false, false, false],
      [false, true, false, false],
      [false, false, true, false],
      [false, false, false, true],
      [false, false, false, false],
    ]);
  });

  it('leaves out only leaf-on traits when leafless; a leaf-off trait is there in leaf too', () => {
    expect(visibleInSeason({ season: 'leaf-on' }, 'leaf-off')).to.equal(false);
    expect(visibleInSeason({ season: 'leaf-on' }, 'leaf-on')).to.equal(true);
    expect(visibleInSeason({ season: 'leaf-off' }, 'leaf-on')).to.equal(true);
    expect(visibleInSeason({ season: 'any' }, 'leaf-off')).to.equal(true);
  });

  it('heads every plant part once, in page order', () => {
    expect(PLANT_PARTS).to.deep.equal(['leaf', 'needle', 'cone', 'fruit', 'flower', 'twig', 'bark', 'form']);
    expect(Object.keys(PART_LABELS)).to.deep.equal([...PLANT_PARTS]);
  });

  it('names a species by its first common name, capitalised, else its scientific name', () => {
    expect(commonName({ commonNames: ['eastern white pine', 'white pine'], scientificName: 'Pinus strobus' })).to.equal('Eastern white pine');
    expect(commonName({ commonNames: [], scientificName: 'Pinus strobus' })).to.equal('Pinus strobus');
  });

  it('shuffles the same way for the same seed, and keeps every item once', () => {
    const items = Array.from({ length: 20 }, (_, i) => i);
    const once = shuffled(items, seededRandom(42));
    expect(shuffled(items, seededRandom(42))).to.deep.equal(once);
    expect(once).to.not.deep.equal(items);
    expect([...once].sort((a, b) => a - b)).to.deep.equal(items);
  });

  // toxic look-alikes, a ranking is not a determination, ticks in the woods (common practice, no source)
  it('carries the cautions on using plants, on determinations and on field hazards', () => {
    const all = GENERAL_CAUTIONS.join(' ');
    expect(all).to.match(/not advice on eating or using/);
    expect(all).to.match(/not a determination/);
    expect(all).to.match(/ticks/);
  });
});
