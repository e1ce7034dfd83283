/**
 * Property tests on random synthetic matrices (fast-check). Each property is a consequence of the
 * scoring model, not of particular numbers: Bayes' rule with likelihoods that never reach 0.
 */
import { expect } from 'chai';
import fc from 'fast-check';
import {
  compileMatrix,
  decodeBundle,
  encodeBundle,
  generateSyntheticMatrix,
  rank,
  seededRandom,
  suggest,
  type CompiledMatrix,
  type Observation,
  type RankResult,
} from '@shared/engine';
import { drawAnswer } from '../../scripts/lib/engine-sim';

const RUNS = 60;

const matrixArbitrary = fc.record({
  seed: fc.integer({ min: 1, max: 2 ** 31 - 1 }),
  taxa: fc.integer({ min: 1, max: 25 }),
  traits: fc.integer({ min: 1, max: 12 }),
  unknownRate: fc.constantFrom(0, 0.05, 0.3),
  multiValueRate: fc.constantFrom(0, 0.2, 0.6),
});

const cache = new Map<string, CompiledMatrix>();
function compiledFor(options: { seed: number; taxa: number; traits: number; unknownRate: number; multiValueRate: number }): CompiledMatrix {
  const key = JSON.stringify(options);
  let compiled = cache.get(key);
  if (!compiled) {
    compiled = compileMatrix(generateSyntheticMatrix({ ...options, conditionalShare: 0.2 }));
    cache.set(key, compiled);
  }
  return compiled;
}

/** Observations drawn from taxon t's coding, without errors, over a random subset of traits. */
function observationsOf(compiled: CompiledMatrix, t: number, seed: number, count: number): Observation[] {
  const random = seededRandom(seed);
  const order = compiled.traits.map((trait) => trait.index).sort(() => random() - 0.5);
  const observations: Observation[] = [];
  for (const j of order.slice(0, count)) {
    const answer = drawAnswer(compiled, j, t, random, 0);
    if (answer) observations.push(answer);
  }
  return observations;
}

function everything(compiled: CompiledMatrix, observations: Observation[]): RankResult {
  return rank(compiled, observations, { limit: Infinity, leeway: Infinity });
}

function probabilityMap(result: RankResult): Map<string, number> {
  return new Map([...result.candidates, ...result.ruledOut].map((candidate) => [candidate.taxonId, candidate.probability]));
}

describe('rank properties on random matrices', () => {
  it('gives finite probabilities that sum to 1', () => {
    fc.assert(
      fc.property(matrixArbitrary, fc.nat(), fc.integer({ min: 0, max: 12 }), fc.integer({ min: 0, max: 3 }), (options, seed, count, leeway) => {
        const compiled = compiledFor(options);
        const t = seed % compiled.taxonCount;
        // answers from one taxon with errors mixed in, so conflicts happen
        const random = seededRandom(seed + 1);
        const observations = compiled.traits
          .slice(0, count)
          .map((trait) => drawAnswer(compiled, trait.index, t, random, 0.3))
          .filter((answer): answer is Observation => answer !== undefined);
        const result = rank(compiled, observations, { limit: Infinity, leeway });
        const all = [...result.candidates, ...result.ruledOut];
        expect(all).to.have.length(compiled.taxonCount);
        let total = 0;
        for (const candidate of all) {
          expect(Number.isFinite(candidate.probability)).to.equal(true);
          expect(candidate.probability).to.be.within(0, 1);
          for (const reason of candidate.reasons) expect(reason.likelihood).to.be.greaterThan(0).and.at.most(1);
          total += candidate.probability;
        }
        expect(total).to.be.closeTo(1, 1e-9);
        for (const candidate of result.candidates) expect(candidate.conflicts).to.be.at.most(leeway);
        for (const candidate of result.ruledOut) expect(candidate.conflicts).to.be.greaterThan(leeway);
      }),
      { numRuns: RUNS },
    );
  });

  it('never lowers the true taxon against a conflicting taxon when a consistent observation is added', () => {
    let checked = 0;
    fc.assert(
      fc.property(matrixArbitrary, fc.nat(), fc.integer({ min: 0, max: 6 }), (options, seed, count) => {
        const compiled = compiledFor(options);
        if (compiled.taxonCount < 2) return;
        const truth = seed % compiled.taxonCount;
        const before = observationsOf(compiled, truth, seed, count);
        const seen = new Set(before.map((observation) => observation.trait));
        const random = seededRandom(seed + 7);
        for (const trait of compiled.traits) {
          if (seen.has(trait.code)) continue;
          const extra = drawAnswer(compiled, trait.index, truth, random, 0);
          if (!extra) continue;
          const after = [...before, extra];
          const rankedAfter = everything(compiled, after);
          const rankedBefore = everything(compiled, before);
          // an answer that sets earlier answers aside (appliesWhen) changes the evidence itself; not this property
          if ((rankedAfter.skipped?.length ?? 0) !== (rankedBefore.skipped?.length ?? 0)) continue;
          const p0 = probabilityMap(rankedBefore);
          const p1 = probabilityMap(rankedAfter);
          const truthId = compiled.taxa[truth].id;
          for (const candidate of [...rankedAfter.candidates, ...rankedAfter.ruledOut]) {
            const conflicting = candidate.reasons.find((reason) => reason.trait === extra.trait)?.status === 'conflict';
            if (!conflicting || candidate.taxonId === truthId) continue;
            const ratioBefore = (p0.get(truthId) ?? 0) / (p0.get(candidate.taxonId) ?? 1);
            const ratioAfter = (p1.get(truthId) ?? 0) / (p1.get(candidate.taxonId) ?? 1);
            expect(ratioAfter).to.be.at.least(ratioBefore * (1 - 1e-9));
            checked++;
          }
          break;
        }
      }),
      { numRuns: RUNS },
    );
    expect(checked).to.be.greaterThan(10);
  });

  it('ranks a measurement in inches exactly as the same measurement in centimetres (NIST SP 811: 1 in = 2.54 cm)', () => {
    let measured = 0;
    fc.assert(
      fc.property(matrixArbitrary, fc.double({ min: 0, max: 60, noNaN: true }), (options, inches) => {
        const compiled = compiledFor({ ...options, traits: Math.max(options.traits, 4) });
        const numeric = compiled.traits.find((trait) => trait.kind === 'numeric');
        if (!numeric) return;
        measured++;
        const inInches = rank(compiled, [{ trait: numeric.code, value: inches, unit: 'in' }], { limit: Infinity });
        const inCentimetres = rank(compiled, [{ trait: numeric.code, value: inches * 2.54, unit: 'cm' }], { limit: Infinity });
        expect(inInches.candidates.map((candidate) => [candidate.taxonId, candidate.probability])).to.deep.equal(
          inCentimetres.candidates.map((candidate) => [candidate.taxonId, candidate.probability]),
        );
      }),
      { numRuns: RUNS },
    );
    // Most synthetic matrices of four or more traits carry a numeric trait; the property must have run on a
    // good share of them (about three runs in four do; a third is the floor).
    expect(measured, `runs with a numeric trait out of ${RUNS}`).to.be.at.least(RUNS / 3);
  });

  it('does not depend on the order of the observations', () => {
    const MAX_OBSERVATIONS = 10;
    const indices = Array.from({ length: MAX_OBSERVATIONS }, (_, i) => i);
    let reordered = 0;
    fc.assert(
      fc.property(
        matrixArbitrary,
        fc.nat(),
        fc.integer({ min: 2, max: MAX_OBSERVATIONS }),
        // a uniformly random permutation of 0..9; its restriction to 0..n-1 is a uniform permutation of n
        fc.shuffledSubarray(indices, { minLength: MAX_OBSERVATIONS, maxLength: MAX_OBSERVATIONS }),
        (options, seed, count, permutation) => {
          // at least four traits, so most runs have two or more observations to reorder
          const compiled = compiledFor({ ...options, traits: Math.max(options.traits, 4) });
          const observations = observationsOf(compiled, seed % compiled.taxonCount, seed, count);
          const shuffled = permutation.filter((i) => i < observations.length).map((i) => observations[i]);
          expect(shuffled).to.have.deep.members(observations);
          if (shuffled.some((observation, i) => observation !== observations[i])) reordered++;
          const a = probabilityMap(everything(compiled, observations));
          const b = probabilityMap(everything(compiled, shuffled));
          for (const [id, probability] of a) expect(b.get(id)).to.be.closeTo(probability, 1e-12);
          const orderA = everything(compiled, observations).candidates.map((candidate) => candidate.taxonId);
          const orderB = everything(compiled, shuffled).candidates.map((candidate) => candidate.taxonId);
          // same order except where probabilities tie to rounding
          orderA.forEach((id, i) => {
            if (orderB[i] !== id) expect(a.get(orderB[i])).to.be.closeTo(a.get(id) ?? -1, 1e-12);
          });
        },
      ),
      { numRuns: RUNS },
    );
    // Runs with fewer than two observations, or a permutation that happens to keep the order, prove nothing.
    expect(reordered, `runs whose observations were really reordered, out of ${RUNS}`).to.be.at.least(RUNS / 3);
  });

  it('ranks and suggests identically after encoding and decoding the bundle', () => {
    fc.assert(
      fc.property(matrixArbitrary, fc.nat(), fc.integer({ min: 0, max: 6 }), (options, seed, count) => {
        const compiled = compiledFor(options);
        const decoded = decodeBundle(encodeBundle(compiled));
        const observations = observationsOf(compiled, seed % compiled.taxonCount, seed, count);
        expect(everything(decoded, observations)).to.deep.equal(everything(compiled, observations));
        expect(suggest(decoded, observations, { limit: 3 })).to.deep.equal(suggest(compiled, observations, { limit: 3 }));
      }),
      { numRuns: 30 },
    );
  });

  it('generates the same matrix for the same seed', () => {
    fc.assert(
      fc.property(matrixArbitrary, (options) => {
        expect(generateSyntheticMatrix(options)).to.deep.equal(generateSyntheticMatrix(options));
      }),
      { numRuns: 20 },
    );
  });
});
