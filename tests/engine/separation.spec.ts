/**
 * Graded separation: reliable and usual separators in compare and diagnose, on hand-made matrices,
 * on random synthetic ones, and on the reference matrix.
 */
import { expect } from 'chai';
import fc from 'fast-check';
import {
  compare,
  compileMatrix,
  diagnose,
  generateSyntheticMatrix,
  type Cell,
  type ComparisonResult,
  type MatrixDocument,
  type Trait,
  type TraitComparison,
} from '@shared/engine';
import { relation, separatesCompletely } from '../../shared/engine/separation';
import { loadReferenceMatrix } from '../../seeds/load-matrix';
import { pairKey, separatingTraits } from '../data/matrix-facts';
import { needleLengthTrait, taxon } from './fixtures';

const colourTrait: Trait = {
  code: 'bud-color',
  label: 'Bud colour',
  part: 'twig',
  kind: 'state',
  season: 'leaf-off',
  ease: 2,
  errorRate: 0.1,
  values: ['brown', 'reddish', 'gray', 'yellow', 'black'].map((code) => ({ code, label: code })),
};

/** Two taxa, one state and one numeric trait, coded as given. */
function pair(state: [Cell, Cell], numeric: [Cell, Cell] = ['unknown', 'unknown']): MatrixDocument {
  return {
    format: 'sylvasift-matrix',
    version: 1,
    title: 'Pair',
    traits: [colourTrait, needleLengthTrait],
    taxa: [taxon('a', { 'bud-color': state[0], 'needle-length': numeric[0] }), taxon('b', { 'bud-color': state[1], 'needle-length': numeric[1] })],
  };
}

function entryOf(result: ComparisonResult, code: string): TraitComparison | undefined {
  return [...result.separating, ...result.overlapping, ...result.same, ...result.notCoded].find((item) => item.trait === code);
}

function graded(doc: MatrixDocument, code: string): string {
  const entry = entryOf(compare(compileMatrix(doc), ['a', 'b']), code);
  if (!entry) throw new Error(`no entry for ${code}`);
  return entry.verdict === 'separates' ? `separates/${entry.strength}` : entry.verdict;
}

describe('graded separation of value sets', () => {
  it("counts disjoint usual values as only a usual separation when one shows the other's usual value occasionally", () => {
    expect(graded(pair([{ usual: ['brown'], occasional: ['gray'] }, { usual: ['gray'] }]), 'bud-color')).to.equal('separates/usual');
    expect(graded(pair([{ usual: ['brown'] }, { usual: ['gray'], rare: ['brown'] }]), 'bud-color')).to.equal('separates/usual');
  });

  it('does not separate taxa that share a usual value and differ only in occasional ones', () => {
    expect(
      graded(
        pair([
          { usual: ['brown'], occasional: ['gray'] },
          { usual: ['brown'], occasional: ['yellow'] },
        ]),
        'bud-color',
      ),
    ).to.equal('overlaps');
  });

  it('separates reliably when no usual value of either is coded for the other, even if a less common value is shared', () => {
    expect(
      graded(
        pair([
          { usual: ['brown'], occasional: ['black'] },
          { usual: ['gray'], rare: ['black'] },
        ]),
        'bud-color',
      ),
    ).to.equal('separates/reliable');
    expect(graded(pair([{ usual: ['brown', 'reddish'] }, { usual: ['gray'], occasional: ['yellow'] }]), 'bud-color')).to.equal('separates/reliable');
  });

  it('does not separate by usual values when one taxon has none coded', () => {
    expect(graded(pair([{ occasional: ['brown'] }, { usual: ['gray'], occasional: ['brown'] }]), 'bud-color')).to.equal('overlaps');
  });

  it('separates reliably a taxon the trait applies to from one it does not, and never an unknown cell', () => {
    expect(graded(pair([{ usual: ['brown'] }, 'inapplicable']), 'bud-color')).to.equal('separates/reliable');
    expect(graded(pair([{ usual: ['brown'] }, 'unknown']), 'bud-color')).to.equal('not-coded');
  });
});

describe('graded separation of ranges', () => {
  const state: [Cell, Cell] = [{ usual: ['brown'] }, { usual: ['brown'] }];

  it('does not separate taxa whose typical ranges overlap and whose extremes alone differ', () => {
    expect(
      graded(
        pair(state, [
          { min: 4, low: 8, high: 12, max: 13 },
          { min: 10, low: 11, high: 15, max: 25 },
        ]),
        'needle-length',
      ),
    ).to.equal('overlaps');
  });

  it('treats touching typical ranges as overlapping', () => {
    expect(
      graded(
        pair(state, [
          { min: 4, low: 8, high: 12, max: 13 },
          { min: 12, low: 12, high: 15, max: 20 },
        ]),
        'needle-length',
      ),
    ).to.equal('overlaps');
  });

  it("separates only usually when the typical ranges are disjoint but one reaches into the other's extremes", () => {
    // typical 8–12 and 14–20; b's recorded 11 cm lies in a's typical range
    expect(
      graded(
        pair(state, [
          { min: 6, low: 8, high: 12, max: 13 },
          { min: 11, low: 14, high: 20, max: 22 },
        ]),
        'needle-length',
      ),
    ).to.equal('separates/usual');
  });

  it('separates reliably when the extremes overlap only outside both typical ranges', () => {
    // extremes 6–13.5 and 13–22 share 13–13.5 cm, which is typical for neither
    expect(
      graded(
        pair(state, [
          { min: 6, low: 8, high: 12, max: 13.5 },
          { min: 13, low: 14, high: 20, max: 22 },
        ]),
        'needle-length',
      ),
    ).to.equal('separates/reliable');
    expect(
      graded(
        pair(state, [
          { min: 6, low: 8, high: 12, max: 12.5 },
          { min: 13, low: 14, high: 20, max: 22 },
        ]),
        'needle-length',
      ),
    ).to.equal('separates/reliable');
  });
});

describe('compare and diagnose with graded separators', () => {
  /** t is told from u reliably by bark only, from v usually by needle length only, and from w by nothing. */
  function trio(): MatrixDocument {
    const bark: Trait = { ...colourTrait, code: 'bark-color', label: 'Bark colour', part: 'bark', ease: 1 };
    return {
      format: 'sylvasift-matrix',
      version: 1,
      title: 'Trio',
      traits: [needleLengthTrait, bark],
      taxa: [
        taxon('t', { 'needle-length': { min: 6, low: 8, high: 12, max: 13 }, 'bark-color': { usual: ['brown'] } }),
        taxon('u', { 'needle-length': { min: 6, low: 8, high: 12, max: 13 }, 'bark-color': { usual: ['gray'] } }),
        taxon('v', { 'needle-length': { min: 11, low: 14, high: 20, max: 22 }, 'bark-color': { usual: ['brown'] } }),
        taxon('w', { 'needle-length': { min: 6, low: 9, high: 11, max: 13 }, 'bark-color': { usual: ['gray', 'brown'] } }),
      ],
    };
  }

  it('lists reliable separators before usual ones', () => {
    const doc = trio();
    doc.taxa[2].cells['bark-color'] = { usual: ['gray'], occasional: ['brown'] };
    const result = compare(compileMatrix(doc), ['t', 'v']);
    // both separate t from v only usually here, so they keep matrix order
    expect(result.separating.map((item) => [item.trait, item.strength])).to.deep.equal([
      ['needle-length', 'usual'],
      ['bark-color', 'usual'],
    ]);
    const reliableFirst = compare(compileMatrix(trio()), ['t', 'u']);
    expect(reliableFirst.separating.map((item) => [item.trait, item.strength])).to.deep.equal([['bark-color', 'reliable']]);
    doc.taxa[2].cells['bark-color'] = { usual: ['gray'] };
    const mixed = compare(compileMatrix(doc), ['t', 'v']);
    expect(mixed.separating.map((item) => [item.trait, item.strength])).to.deep.equal([
      ['bark-color', 'reliable'],
      ['needle-length', 'usual'],
    ]);
    expect(mixed.separating[1].text).to.match(/usually tells/);
  });

  it('grades a set by its weakest pair', () => {
    const result = compare(compileMatrix(trio()), ['t', 'u', 'v']);
    // t/u are coded alike on length, so length does not separate the set
    expect(entryOf(result, 'needle-length')?.verdict).to.equal('overlaps');
    const doc = trio();
    doc.taxa[1].cells['needle-length'] = { min: 25, low: 26, high: 30, max: 31 };
    const three = compare(compileMatrix(doc), ['t', 'u', 'v']);
    // t/u and u/v are apart reliably, t/v only usually
    expect(entryOf(three, 'needle-length')).to.include({ verdict: 'separates', strength: 'usual' });
  });

  it('covers with reliable separators first, then usual ones, and names what nothing separates', () => {
    const result = diagnose(compileMatrix(trio()), 't');
    expect(result.traits.map((item) => ({ trait: item.trait, strength: item.strength, separations: item.separations }))).to.deep.equal([
      { trait: 'bark-color', strength: 'reliable', separations: [{ taxonId: 'u', strength: 'reliable' }] },
      { trait: 'needle-length', strength: 'usual', separations: [{ taxonId: 'v', strength: 'usual' }] },
    ]);
    expect(result.traits.map((item) => item.separates)).to.deep.equal([['u'], ['v']]);
    expect(result.unseparated).to.deep.equal(['w']);
    expect(result.traits[0].text).to.equal('Bark colour (usually brown) sets it apart from u.');
    expect(result.traits[1].text).to.match(/^Needle length \(typically 8–12 cm, recorded 6–13 cm\) usually sets it apart from v; /);
  });

  it('lets a trait already chosen for a reliable separation take its usual ones too, before adding another trait', () => {
    const doc = trio();
    // bark now also usually separates t from v: no second trait is needed
    doc.taxa[2].cells['bark-color'] = { usual: ['gray'], occasional: ['brown'] };
    const result = diagnose(compileMatrix(doc), 't', ['t', 'u', 'v']);
    expect(result.traits.map((item) => item.trait)).to.deep.equal(['bark-color']);
    expect(result.traits[0].separations).to.deep.equal([
      { taxonId: 'u', strength: 'reliable' },
      { taxonId: 'v', strength: 'usual' },
    ]);
    expect(result.traits[0].strength).to.equal('usual');
    expect(result.traits[0].text).to.match(/sets it apart from u, and usually from v/);
  });
});

describe('graded separation on random matrices', () => {
  it('is symmetric, agrees with compare, and grades every complete separation as reliable', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), fc.integer({ min: 2, max: 12 }), fc.integer({ min: 1, max: 8 }), (seed, taxa, traits) => {
        const compiled = compileMatrix(generateSyntheticMatrix({ seed, taxa, traits, unknownRate: 0.1, multiValueRate: 0.4, conditionalShare: 0.2 }));
        for (let a = 0; a < compiled.taxonCount; a++) {
          for (let b = a + 1; b < compiled.taxonCount; b++) {
            const result = compare(compiled, [compiled.taxa[a].id, compiled.taxa[b].id]);
            for (const trait of compiled.traits) {
              const found = relation(compiled, trait, a, b);
              expect(relation(compiled, trait, b, a)).to.equal(found);
              if (separatesCompletely(compiled, trait, a, b)) expect(found).to.equal('reliable');
              const entry = entryOf(result, trait.code)!;
              if (found === 'reliable' || found === 'usual') expect(entry).to.include({ verdict: 'separates', strength: found });
              else expect(entry.verdict).to.not.equal('separates');
            }
            const told = new Set(diagnose(compiled, compiled.taxa[a].id, [compiled.taxa[b].id]).unseparated);
            expect(told.size === 0, `${a}/${b}`).to.equal(result.separating.length > 0);
          }
        }
      }),
      { numRuns: 40 },
    );
  });
});

describe('graded separation on the reference matrix', () => {
  const doc = loadReferenceMatrix();
  const compiled = compileMatrix(doc);

  it('tells loblolly pine from shortleaf and slash pine at least by their usual values', () => {
    // Flora of North America vol. 2, Pinus (from memory): shortleaf twigs glaucous (whitish bloom) and
    // its cone scales with small, often deciduous prickles, loblolly's twigs not glaucous and its
    // prickles stout and sharp; slash pine cones on stalks to about 3 cm, loblolly's sitting on the branch.
    const echinata = compare(compiled, ['pinus-taeda', 'pinus-echinata']);
    const elliottii = compare(compiled, ['pinus-taeda', 'pinus-elliottii']);
    expect(echinata.separating.map((item) => item.trait)).to.include.members(['cone-scale-tip', 'twig-bloom']);
    expect(elliottii.separating.map((item) => item.trait)).to.include('cone-stalk');
    for (const entry of [...echinata.separating, ...elliottii.separating]) expect(entry.strength).to.be.oneOf(['reliable', 'usual']);
    const taeda = doc.taxa.find((item) => item.id === 'pinus-taeda')!;
    const diagnosis = diagnose(compiled, 'pinus-taeda', taeda.lookAlikes);
    expect(diagnosis.unseparated).to.deep.equal([]);
    const told = new Map(diagnosis.traits.flatMap((item) => item.separations.map((separation) => [separation.taxonId, item.trait])));
    expect(told.get('pinus-echinata')).to.be.oneOf(['cone-scale-tip', 'twig-bloom']);
    expect(told.get('pinus-elliottii')).to.equal('cone-stalk');
  });

  it('separates every pair not recorded as inseparable, and finds every separator the data checks find (common practice, no source)', () => {
    const listed = new Set((doc.inseparable ?? []).map((item) => pairKey(item.taxa[0], item.taxa[1])));
    const unexplained: string[] = [];
    const missed: string[] = [];
    for (let i = 0; i < doc.taxa.length; i++) {
      for (let j = i + 1; j < doc.taxa.length; j++) {
        const a = doc.taxa[i];
        const b = doc.taxa[j];
        const engine = new Set(compare(compiled, [a.id, b.id]).separating.map((item) => item.trait));
        if (engine.size === 0 && !listed.has(pairKey(a.id, b.id))) unexplained.push(`${a.id} / ${b.id}`);
        for (const code of separatingTraits(a, b, doc.traits)) if (!engine.has(code)) missed.push(`${a.id} / ${b.id}: ${code}`);
      }
    }
    expect(unexplained, 'pairs nothing separates').to.deep.equal([]);
    expect(missed, 'separators the engine does not see').to.deep.equal([]);
  });
});
