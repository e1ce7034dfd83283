import { expect } from 'chai';
import fc from 'fast-check';
import {
  compileMatrix,
  generateSyntheticMatrix,
  ObservationError,
  prepareObservations,
  rank,
  seededRandom,
  type Candidate,
  type MatrixDocument,
  type Observation,
  type RankResult,
} from '@shared/engine';
import { exactProbability, scoreObservations } from '../../shared/engine/scoring';
import { drawAnswer } from '../../scripts/lib/engine-sim';
import { arithmeticMatrix, southernTreesMatrix, taxon } from './fixtures';

function probabilities(result: RankResult): Record<string, number> {
  return Object.fromEntries([...result.candidates, ...result.ruledOut].map((candidate) => [candidate.taxonId, candidate.probability]));
}

function byId(result: RankResult, id: string): Candidate {
  const found = [...result.candidates, ...result.ruledOut].find((candidate) => candidate.taxonId === id);
  if (!found) throw new Error(`${id} not in result`);
  return found;
}

describe('rank: worked examples', () => {
  const compiled = compileMatrix(arithmeticMatrix());

  it('mixes the coded frequency with the observer error rate (one state observation)', () => {
    // Observer model (common practice in probabilistic keys, no source): the observer reports the true
    // value with probability 1 − e and each of the k − 1 other values with probability e / (k − 1).
    // Here e = 0.1 and k = 3, so a value the taxon does not show scores 0.1 / 2 = 0.05.
    //   A usual {alternate}:            0.9 × 1 + 0.05 × 0 = 0.9
    //   B usual {opposite}:             0.9 × 0 + 0.05 × 1 = 0.05   (conflict)
    //   C usual {alternate, opposite}:  0.9 × ½ + 0.05 × ½ = 0.475
    //   D unknown: every value equally likely, 1/3
    // Sum 1.758333…, uniform prior: P(A) = 0.9 / 1.758333 = 0.511848, P(B) = 0.028436,
    // P(C) = 0.270142, P(D) = 0.189573.
    const result = rank(compiled, [{ trait: 'leaf-arrangement', values: ['alternate'] }]);
    const p = probabilities(result);
    expect(p['taxon-a']).to.be.closeTo(0.511848, 1e-6);
    expect(p['taxon-b']).to.be.closeTo(0.028436, 1e-6);
    expect(p['taxon-c']).to.be.closeTo(0.270142, 1e-6);
    expect(p['taxon-d']).to.be.closeTo(0.189573, 1e-6);
    expect(result.candidates.map((candidate) => candidate.taxonId)).to.deep.equal(['taxon-a', 'taxon-c', 'taxon-d', 'taxon-b']);
    expect(byId(result, 'taxon-b').conflicts).to.equal(1);
    expect(byId(result, 'taxon-b').reasons[0]).to.include({ status: 'conflict', likelihood: 0.05 });
    expect(byId(result, 'taxon-d').reasons[0]).to.include({ status: 'not-coded' });
  });

  it('scores a measurement full inside the typical range, partly in the extremes, low outside', () => {
    // needle-length, e = 0.05; 20 cm against A (typical 12–18, extremes 10–23): extreme, 0.3;
    // B (typical 20–45): 1; C (4–9): outside, 0.05 and a conflict; D not coded: 0.3.
    // With the arrangement answer above: A 0.9 × 0.3 = 0.27, B 0.05 × 1 = 0.05,
    // C 0.475 × 0.05 = 0.02375, D ⅓ × 0.3 = 0.1; sum 0.44375:
    // P(A) = 0.608451, P(B) = 0.112676, P(C) = 0.053521, P(D) = 0.225352.
    const result = rank(
      compiled,
      [
        { trait: 'leaf-arrangement', values: ['alternate'] },
        { trait: 'needle-length', value: 20 },
      ],
      { leeway: 0 },
    );
    const p = probabilities(result);
    expect(p['taxon-a']).to.be.closeTo(0.608451, 1e-6);
    expect(p['taxon-b']).to.be.closeTo(0.112676, 1e-6);
    expect(p['taxon-c']).to.be.closeTo(0.053521, 1e-6);
    expect(p['taxon-d']).to.be.closeTo(0.225352, 1e-6);
    expect(result.candidates.map((candidate) => candidate.taxonId)).to.deep.equal(['taxon-a', 'taxon-d']);
    expect(result.ruledOut.map((candidate) => candidate.taxonId)).to.deep.equal(['taxon-b', 'taxon-c']);
    expect(byId(result, 'taxon-a').reasons[1]).to.include({ status: 'partial', likelihood: 0.3 });
    expect(byId(result, 'taxon-c').reasons[1]).to.include({ status: 'conflict', likelihood: 0.05 });
    expect(byId(result, 'taxon-c').reasons[1].text).to.contain('outside').and.contain('4–9 cm');
  });

  it('reads "one of these values" as the sum over the values', () => {
    // {alternate, whorled}: A 0.9 + 0.05 = 0.95, B 0.05 + 0.05 = 0.1 (still a conflict: neither is coded),
    // C 0.475 + 0.05 = 0.525, D 2/3. Sum 2.241667: P(A) = 0.423792.
    const result = rank(compiled, [{ trait: 'leaf-arrangement', values: ['alternate', 'whorled'] }]);
    expect(probabilities(result)['taxon-a']).to.be.closeTo(0.95 / 2.2416667, 1e-6);
    expect(byId(result, 'taxon-b').conflicts).to.equal(1);
    expect(byId(result, 'taxon-b').reasons[0].likelihood).to.be.closeTo(0.1, 1e-12);
  });

  it('gives the same result for inches, millimetres and centimetres (NIST SP 811: 1 in = 2.54 cm = 25.4 mm)', () => {
    const inches = rank(compiled, [{ trait: 'needle-length', value: 6, unit: 'in' }]);
    const centimetres = rank(compiled, [{ trait: 'needle-length', value: 15.24, unit: 'cm' }]);
    const millimetres = rank(compiled, [{ trait: 'needle-length', value: 152.4, unit: 'mm' }]);
    expect(probabilities(inches)).to.deep.equal(probabilities(centimetres));
    expect(probabilities(millimetres)).to.deep.equal(probabilities(centimetres));
    expect(byId(inches, 'taxon-a').reasons[0].text).to.contain('6 in (15.24 cm)');
  });

  it('with no observations returns the prior', () => {
    const doc = arithmeticMatrix();
    doc.taxa[0].prior = 3;
    const result = rank(compileMatrix(doc), []);
    // priors 3, 1, 1, 1 → 0.5, 1/6, 1/6, 1/6
    const expected: Record<string, number> = { 'taxon-a': 0.5, 'taxon-b': 1 / 6, 'taxon-c': 1 / 6, 'taxon-d': 1 / 6 };
    for (const [id, probability] of Object.entries(probabilities(result))) expect(probability).to.be.closeTo(expected[id], 1e-12);
  });
});

describe('rank: southern trees', () => {
  const compiled = compileMatrix(southernTreesMatrix());

  it('ranks a loblolly-like observation first (3 needles, 6 in, plated bark)', () => {
    const result = rank(compiled, [
      { trait: 'foliage', values: ['needle'] },
      { trait: 'needles-per-fascicle', values: [3] },
      { trait: 'needle-length', value: 6, unit: 'in' },
      { trait: 'bark-texture', values: ['plated'] },
    ]);
    expect(result.candidates[0].taxonId).to.equal('pinus-taeda');
    expect(result.candidates[0].reasons.map((reason) => [reason.trait, reason.status])).to.deep.equal([
      ['foliage', 'matched'],
      ['needles-per-fascicle', 'matched'],
      ['needle-length', 'matched'],
      ['bark-texture', 'matched'],
    ]);
  });

  it('lowers a taxon for one wrong answer instead of removing it', () => {
    // a white-pine-like tree reported with 3 needles by mistake, everything else right
    const result = rank(compiled, [
      { trait: 'foliage', values: ['needle'] },
      { trait: 'needles-per-fascicle', values: [3] },
      { trait: 'needle-length', value: 8 },
      { trait: 'bark-texture', values: ['furrowed'] },
    ]);
    const strobus = byId(result, 'pinus-strobus');
    expect(strobus.conflicts).to.equal(1);
    expect(result.candidates.map((candidate) => candidate.taxonId)).to.include('pinus-strobus');
    expect(strobus.probability).to.be.greaterThan(0.1);
  });

  it('counts an observation of an inapplicable trait as a conflict', () => {
    const result = rank(compiled, [{ trait: 'lobe-tips', values: ['rounded'] }], { limit: 10 });
    const taeda = byId(result, 'pinus-taeda');
    expect(taeda.conflicts).to.equal(1);
    // lobe-tips: e = 0.08, k = 4 → e / (k − 1) = 0.026667
    expect(taeda.reasons[0]).to.include({ status: 'conflict' });
    expect(taeda.reasons[0].likelihood).to.be.closeTo(0.08 / 3, 1e-12);
    expect(taeda.reasons[0].text).to.contain('does not apply');
  });

  it('treats a trait as inapplicable for a taxon coded outside its appliesWhen condition', () => {
    // oaks are coded foliage = broad and have no needle bundles coded at all ("unknown")
    const result = rank(compiled, [{ trait: 'needles-per-fascicle', values: [3] }], { limit: 10 });
    const alba = byId(result, 'quercus-alba');
    expect(alba.conflicts).to.equal(1);
    expect(alba.reasons[0].status).to.equal('conflict');
    // counts 1–5, e = 0.05 → 0.05 / 4
    expect(alba.reasons[0].likelihood).to.be.closeTo(0.0125, 1e-12);
  });

  it('sets aside an observation whose condition another observation contradicts', () => {
    const both = rank(
      compiled,
      [
        { trait: 'foliage', values: ['broad'] },
        { trait: 'needles-per-fascicle', values: [3] },
      ],
      { limit: 10 },
    );
    const foliageOnly = rank(compiled, [{ trait: 'foliage', values: ['broad'] }], { limit: 10 });
    expect(both.skipped).to.have.length(1);
    expect(both.skipped?.[0].trait).to.equal('needles-per-fascicle');
    expect(both.skipped?.[0].reason).to.contain('only applies when Foliage form is needles, and you saw broad leaves');
    expect(probabilities(both)).to.deep.equal(probabilities(foliageOnly));
    for (const candidate of both.candidates) expect(candidate.reasons[1].status).to.equal('not-applicable');
  });

  it('breaks ties with priors, and options.priors override the coded ones', () => {
    // three broadleaves score 0.98 each on "broad"; quercus-alba has prior 2
    const coded = rank(compiled, [{ trait: 'foliage', values: ['broad'] }]);
    expect(coded.candidates[0].taxonId).to.equal('quercus-alba');
    const overridden = rank(compiled, [{ trait: 'foliage', values: ['broad'] }], { priors: { 'acer-rubrum': 5 } });
    expect(overridden.candidates[0].taxonId).to.equal('acer-rubrum');
  });

  it('respects leeway and limit', () => {
    const observations = [
      { trait: 'foliage', values: ['needle'] },
      { trait: 'needles-per-fascicle', values: [3] },
    ];
    const strict = rank(compiled, observations, { leeway: 0 });
    expect(strict.candidates.every((candidate) => candidate.conflicts === 0)).to.equal(true);
    expect(strict.ruledOut.every((candidate) => candidate.conflicts > 0)).to.equal(true);
    expect(strict.candidates.length + strict.ruledOut.length).to.equal(7);
    const limited = rank(compiled, observations, { leeway: 0, limit: 1 });
    expect(limited.candidates).to.have.length(1);
    expect(limited.ruledOut).to.have.length(1);
    expect(limited.totalCandidates).to.equal(strict.candidates.length);
    expect(limited.candidates[0]).to.deep.equal(strict.candidates[0]);
    const none = rank(compiled, observations, { limit: 0 });
    expect(none.candidates).to.deep.equal([]);
  });

  it('throws an ObservationError carrying the problems for invalid observations', () => {
    expect(() => rank(compiled, [{ trait: 'foliage', values: ['feathers'] }]))
      .to.throw(ObservationError)
      .with.property('problems')
      .that.has.length(1);
    expect(() => rank(compiled, [], { leeway: -1 })).to.throw(/leeway/);
  });
});

describe('rank: edge cases', () => {
  const empty: MatrixDocument = { format: 'sylvasift-matrix', version: 1, title: 'Empty', traits: [], taxa: [] };

  it('handles an empty matrix', () => {
    const result = rank(compileMatrix(empty), []);
    expect(result.candidates).to.deep.equal([]);
    expect(result.ruledOut).to.deep.equal([]);
  });

  it('handles a matrix with traits but no taxa', () => {
    const doc = arithmeticMatrix();
    doc.taxa = [];
    expect(rank(compileMatrix(doc), [{ trait: 'needle-length', value: 3 }]).candidates).to.deep.equal([]);
  });

  it('keeps the prior when every cell is unknown', () => {
    const doc = arithmeticMatrix();
    doc.taxa = [taxon('one', {}), taxon('two', {}, { prior: 3 })];
    const result = rank(compileMatrix(doc), [
      { trait: 'leaf-arrangement', values: ['opposite'] },
      { trait: 'needle-length', value: 12 },
    ]);
    expect(probabilities(result)['two']).to.be.closeTo(0.75, 1e-12);
    expect(result.candidates.every((candidate) => candidate.conflicts === 0)).to.equal(true);
  });

  it('never returns NaN, even with zero prior weights or extreme evidence', () => {
    const compiled = compileMatrix(southernTreesMatrix());
    const zeroPriors = Object.fromEntries(compiled.taxa.map((info) => [info.id, 0]));
    const result = rank(
      compiled,
      [
        { trait: 'foliage', values: ['scale'] },
        { trait: 'needle-length', value: 1e6 },
        { trait: 'lobe-tips', values: ['spiny'] },
      ],
      { priors: zeroPriors, limit: 100, leeway: 100 },
    );
    const total = result.candidates.reduce((sum, candidate) => sum + candidate.probability, 0);
    expect(result.candidates).to.have.length(7);
    for (const candidate of result.candidates) expect(Number.isFinite(candidate.probability)).to.equal(true);
    expect(total).to.be.closeTo(1, 1e-12);
  });
});

describe('rank reusing its per-matrix scratch', () => {
  it('gives bit-identical results to a scoring with fresh arrays, whatever was ranked before', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), fc.integer({ min: 1, max: 60 }), fc.integer({ min: 1, max: 12 }), (seed, taxa, traits) => {
        const compiled = compileMatrix(generateSyntheticMatrix({ seed, taxa, traits, unknownRate: 0.1, multiValueRate: 0.4, conditionalShare: 0.2 }));
        const random = seededRandom(seed);
        const draw = (): Observation[] => {
          const t = Math.floor(random() * compiled.taxonCount);
          return compiled.traits
            .flatMap((trait) => (random() < 0.6 ? [drawAnswer(compiled, trait.index, t, random, 0.2)] : []))
            .filter((item): item is Observation => item !== undefined);
        };
        const first = draw();
        const second = draw();
        const options = { leeway: Infinity, limit: Infinity };
        const once = rank(compiled, first, options);
        // a ranking in between leaves other numbers in the scratch
        rank(compiled, second, { leeway: 0, limit: 3 });
        const again = rank(compiled, first, options);
        expect(JSON.stringify(again)).to.equal(JSON.stringify(once));
        const fresh = scoreObservations(compiled, prepareObservations(compiled, first), undefined, { withProbabilities: false });
        for (const candidate of [...again.candidates, ...again.ruledOut]) {
          const t = compiled.taxonIndexById.get(candidate.taxonId)!;
          expect(Object.is(candidate.probability, exactProbability(fresh, t)), candidate.taxonId).to.equal(true);
          expect(candidate.conflicts).to.equal(fresh.conflicts[t]);
        }
      }),
      { numRuns: 60 },
    );
  });
});
