import { expect } from 'chai';
import { compileMatrix, entropy, suggest, type MatrixDocument, type Trait } from '@shared/engine';
import { expectedGain } from '../../shared/engine/entropy';
import { southernTreesMatrix, taxon } from './fixtures';

function binaryEntropy(p: number): number {
  return -p * Math.log2(p) - (1 - p) * Math.log2(1 - p);
}

function stateTrait(code: string, values: number, extra: Partial<Trait> = {}): Trait {
  return {
    code,
    label: code,
    part: 'leaf',
    kind: 'state',
    season: 'any',
    ease: 1,
    errorRate: 0,
    values: Array.from({ length: values }, (_, v) => ({ code: `v${v}`, label: `value ${v}` })),
    ...extra,
  };
}

/** Eight taxa: `halves` splits them 4/4, `quarters` 2/2/2/2, `same` not at all. */
function eightTaxa(): MatrixDocument {
  return {
    format: 'sylvasift-matrix',
    version: 1,
    title: 'Eight',
    traits: [
      stateTrait('halves', 2),
      stateTrait('quarters', 4, { ease: 4 }),
      stateTrait('same', 2),
      stateTrait('summer-only', 2, { season: 'leaf-on' }),
      stateTrait('winter-twig', 2, { season: 'leaf-off' }),
    ],
    taxa: Array.from({ length: 8 }, (_, i) =>
      taxon(`taxon-${i}`, {
        halves: { usual: [`v${i % 2}`] },
        quarters: { usual: [`v${i % 4}`] },
        same: { usual: ['v0'] },
        'summer-only': { usual: [`v${Math.floor(i / 4)}`] },
        'winter-twig': { usual: [`v${Math.floor(i / 4)}`] },
      }),
    ),
  };
}

describe('entropy and information gain', () => {
  // Shannon 1948, "A Mathematical Theory of Communication", section 6: H is maximal, log2 N bits,
  // for N equally likely outcomes.
  it('is log2 N for a uniform distribution over N', () => {
    for (const n of [1, 2, 3, 8, 10, 1000]) expect(entropy(new Array<number>(n).fill(1 / n))).to.be.closeTo(Math.log2(n), 1e-12);
    expect(entropy([0.5, 0.5, 0])).to.equal(1);
    expect(entropy([])).to.equal(0);
    expect(entropy([0, 0])).to.equal(0);
  });

  // Shannon 1948: an error-free answer that splits 8 equally likely candidates 4/4 leaves log2 4 = 2
  // bits of the 3, i.e. gains exactly 1 bit.
  it('gains exactly 1 bit from an error-free 4/4 split of 8 equally likely candidates', () => {
    const weights = new Array<number>(8).fill(1 / 8);
    const left = [1, 1, 1, 1, 0, 0, 0, 0];
    const right = left.map((value) => 1 - value);
    expect(expectedGain(weights, [left, right])).to.equal(1);
  });

  // Binary symmetric channel (Shannon 1948, section 13; Cover & Thomas, Elements of Information
  // Theory, 2nd ed., 7.1.4): with error probability e the answer carries 1 − H_b(e) bits.
  it('gains 1 − H_b(e) bits when the answer is wrong with probability e', () => {
    const e = 0.1;
    const weights = new Array<number>(8).fill(1 / 8);
    const left = [1, 1, 1, 1, 0, 0, 0, 0].map((value) => (value ? 1 - e : e));
    const right = left.map((value) => 1 - value);
    expect(expectedGain(weights, [left, right])).to.be.closeTo(1 - binaryEntropy(e), 1e-12);
  });
});

describe('suggest', () => {
  const compiled = compileMatrix(eightTaxa());

  it('scores a 4/4 split of 8 equally likely taxa at 1 − H_b(e) bits (e = the 0.001 floor)', () => {
    const halves = suggest(compiled, [], { limit: 10, lookaheadMaxCandidates: 0 }).find((item) => item.trait === 'halves');
    expect(halves?.expectedGain).to.be.closeTo(1 - binaryEntropy(0.001), 1e-9);
    expect(halves?.score).to.equal(halves?.expectedGain);
  });

  it('divides the gain by ease', () => {
    const quarters = suggest(compiled, [], { limit: 10, lookaheadMaxCandidates: 0 }).find((item) => item.trait === 'quarters');
    expect(quarters).to.not.equal(undefined);
    expect(quarters?.score).to.be.closeTo((quarters?.expectedGain ?? 0) / 4, 1e-12);
    // an error-free 2/2/2/2 split would gain 2 bits; the 0.001 error floor costs a little
    expect(quarters?.expectedGain).to.be.within(1.95, 2);
  });

  it('leaves out traits that cannot split the shortlist and traits already observed or excluded', () => {
    const codes = suggest(compiled, [{ trait: 'halves', values: ['v0'] }], { limit: 10, exclude: ['winter-twig'] }).map((item) => item.trait);
    expect(codes).to.not.include('same');
    expect(codes).to.not.include('halves');
    expect(codes).to.not.include('winter-twig');
    expect(codes).to.include('quarters');
  });

  it('hides leaf-on traits in a leaf-off sift and shows leaf-off traits in both', () => {
    const leafOff = suggest(compiled, [], { season: 'leaf-off', limit: 10 }).map((item) => item.trait);
    const leafOn = suggest(compiled, [], { season: 'leaf-on', limit: 10 }).map((item) => item.trait);
    expect(leafOff).to.not.include('summer-only');
    expect(leafOff).to.include('winter-twig');
    expect(leafOn).to.include.members(['summer-only', 'winter-twig', 'halves']);
  });

  it('previews each answer with its probability, the leaders and what remains', () => {
    const [first] = suggest(compiled, [{ trait: 'quarters', values: ['v1'] }], { limit: 1, leeway: 0 });
    // taxa 1 and 5 remain; halves cannot split them (both v1), summer-only and winter-twig can
    expect(['summer-only', 'winter-twig']).to.include(first.trait);
    const total = first.preview.reduce((sum, answer) => sum + answer.probability, 0);
    expect(total).to.be.closeTo(1, 1e-9);
    const v0 = first.preview.find((answer) => answer.answer === 'v0');
    expect(v0?.leaders[0]).to.equal('taxon-1');
    expect(v0?.probability).to.be.closeTo(0.5, 1e-2);
    expect(v0?.remaining).to.equal(1);
  });

  it('puts foliage first on the southern trees (pines versus broadleaves)', () => {
    const southern = compileMatrix(southernTreesMatrix());
    const [first] = suggest(southern, []);
    expect(first.trait).to.equal('foliage');
    expect(first.expectedEffort).to.be.a('number');
  });

  it('never suggests a trait whose appliesWhen an observation contradicts', () => {
    const southern = compileMatrix(southernTreesMatrix());
    const codes = suggest(southern, [{ trait: 'foliage', values: ['broad'] }], { limit: 10 }).map((item) => item.trait);
    expect(codes).to.not.include.members(['needles-per-fascicle', 'needle-length']);
    expect(codes).to.include('lobe-tips');
  });

  it('bands numeric traits for the preview', () => {
    const southern = compileMatrix(southernTreesMatrix());
    const pines = [
      { trait: 'foliage', values: ['needle'] },
      { trait: 'needles-per-fascicle', values: [3] },
    ];
    const length = suggest(southern, pines, { limit: 10 }).find((item) => item.trait === 'needle-length');
    expect(length).to.not.equal(undefined);
    expect(length?.preview.length).to.be.at.least(2);
    expect(length?.preview[0].label).to.match(/^< [\d.]+ cm$/);
    expect(length?.preview[length.preview.length - 1].label).to.match(/^≥ [\d.]+ cm$/);
  });

  it('returns nothing for fewer than two taxa or limit 0', () => {
    const one = eightTaxa();
    one.taxa = one.taxa.slice(0, 1);
    expect(suggest(compileMatrix(one), [])).to.deep.equal([]);
    expect(suggest(compiled, [], { limit: 0 })).to.deep.equal([]);
  });
});
