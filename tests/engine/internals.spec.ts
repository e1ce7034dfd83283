import { expect } from 'chai';
import { compileMatrix, formatNumber, generateSyntheticMatrix, inSentence, prepareObservations, rank, seededRandom, type Observation } from '@shared/engine';
import { bandLabel, bandOf, bandProbabilities, niceBetween, weightedCuts } from '../../shared/engine/bands';
import { countSpanOf, parseCount } from '../../shared/engine/count-span';
import { addTen, addTenByPairs } from '../../shared/engine/kernels';
import { measureRegion, regionLikelihood, type ScoreColumn } from '../../shared/engine/likelihood-columns';
import { logNormaliser, normalise } from '../../shared/engine/normalise';
import { exactProbability, scoreObservations } from '../../shared/engine/scoring';
import { drawAnswer } from '../../scripts/lib/engine-sim';
import { arithmeticMatrix } from './fixtures';
import fc from 'fast-check';
import { loadReferenceMatrix } from '../../seeds/load-matrix';
import { ConflictCounts, paddedBytes, wordsOf } from '../../shared/engine/conflict-flags';

describe('internals: numeric bands', () => {
  it('puts every length in exactly one band', () => {
    const cuts = [5, 10, 20];
    expect([0, 4.99, 5, 9.99, 10, 19.99, 20, 1000].map((x) => bandOf(cuts, x))).to.deep.equal([0, 0, 1, 1, 2, 2, 3, 3]);
    expect([0, 1, 2, 3].map((b) => bandLabel(cuts, b))).to.deep.equal(['< 5 cm', '5–10 cm', '10–20 cm', '≥ 20 cm']);
  });

  it('gives band probabilities that sum to 1, with the error spread evenly', () => {
    const out = new Float64Array(4);
    bandProbabilities(4, 6, 9, 12, [5, 10, 20], 0.8, 0.1, out);
    expect(out.reduce((sum, value) => sum + value, 0)).to.be.closeTo(1, 1e-12);
    // typical 6–9 lies in band 1 (5–10): 0.9 × (0.8 + tails 5–6 and 9–10 = 2 of 5 cm × 0.2) + 0.1 / 4
    expect(out[1]).to.be.closeTo(0.9 * (0.8 + 0.2 * (2 / 5)) + 0.025, 1e-12);
    expect(out[3]).to.be.closeTo(0.025, 1e-12);
    bandProbabilities(7, 7, 7, 7, [5, 10], 0.8, 0, out.subarray(0, 3));
    expect([...out.subarray(0, 3)]).to.deep.equal([0, 1, 0]);
  });

  it('cuts a small shortlist between its midpoints at round numbers', () => {
    const cuts = weightedCuts([3, 8, 15, 40], [1, 1, 1, 1], 4);
    // midway points 5.5, 11.5 and 27.5, each rounded to one significant digit that stays between its neighbours
    expect(cuts).to.deep.equal([6, 10, 30]);
    expect(weightedCuts([5, 5, 5], [1, 1, 1], 4)).to.deep.equal([]);
    expect(niceBetween(12.34, 12.9)).to.be.within(12.34, 12.9);
  });
});

describe('internals: count spans', () => {
  it('reads counts written as numbers or digit strings only', () => {
    expect([3, '3', 2.5, '2.5', '-1', 'three'].map(parseCount)).to.deep.equal([3, 3, undefined, undefined, undefined, undefined]);
  });

  it('prefers countRange, else spans labelled and coded counts', () => {
    const trait = { code: 'leaflet-count', label: 'Leaflets', part: 'leaf' as const, kind: 'count' as const, season: 'any' as const, ease: 1, errorRate: 0.1 };
    const taxa = [{ id: 'a', scientificName: 'a', authority: '', family: 'f', commonNames: [], cells: { 'leaflet-count': { usual: [5, 7], rare: [11] } } }];
    expect(countSpanOf({ ...trait, countRange: { min: 1, max: 3 } }, taxa)).to.deep.equal({ min: 1, max: 3 });
    expect(countSpanOf({ ...trait, values: [{ code: '3', label: 'three' }] }, taxa)).to.deep.equal({ min: 3, max: 11 });
    expect(countSpanOf(trait, [])).to.equal(undefined);
  });
});

describe('internals: normalising', () => {
  it('normalises log weights without overflow and copes with -Infinity', () => {
    const probabilities = normalise(Float64Array.from([1000, 1000 + Math.log(3)]));
    expect(probabilities[0]).to.be.closeTo(0.25, 1e-12);
    expect(probabilities[1]).to.be.closeTo(0.75, 1e-12);
    expect([...normalise(Float64Array.from([-Infinity, -Infinity]))]).to.deep.equal([0.5, 0.5]);
    expect(logNormaliser(new Float64Array(0))).to.deep.equal({ maxLog: 0, logTotal: 0 });
  });

  it('gives the same probabilities from plain products as from log sums', () => {
    // few observations: the plain-product normaliser is used; compare it with normalising the log sums
    const compiled = compileMatrix(generateSyntheticMatrix({ taxa: 300, traits: 30, seed: 5 }));
    const random = seededRandom(3);
    const observations = compiled.traits
      .slice(0, 12)
      .map((trait) => drawAnswer(compiled, trait.index, 17, random, 0.1))
      .filter((answer): answer is Observation => answer !== undefined);
    const prepared = prepareObservations(compiled, observations);
    const scored = scoreObservations(compiled, prepared);
    const logs = scoreObservations(compiled, prepared, undefined, { forceLogs: true });
    expect(scored.linear).to.equal(true);
    expect(logs.linear).to.equal(false);
    const fromLogs = normalise(logs.score);
    for (let t = 0; t < compiled.taxonCount; t++) {
      expect(scored.probability[t]).to.be.closeTo(fromLogs[t], 1e-12);
      expect(exactProbability(scored, t)).to.be.closeTo(fromLogs[t], 1e-12);
    }
  });

  it('falls back to log sums when plain products could underflow', () => {
    // 200 observations of traits with a 0.001 error floor could multiply to below 1e-600
    const doc = generateSyntheticMatrix({ taxa: 50, traits: 200, seed: 8, errorRate: 0, numericShare: 0, countShare: 0, conditionalShare: 0 });
    const compiled = compileMatrix(doc);
    const random = seededRandom(4);
    const observations = compiled.traits
      .map((trait) => drawAnswer(compiled, trait.index, 0, random, 0.3))
      .filter((answer): answer is Observation => answer !== undefined);
    const scored = scoreObservations(compiled, prepareObservations(compiled, observations));
    expect(scored.linear).to.equal(false);
    expect(scored.maxLog).to.not.equal(0);
    const total = scored.probability.reduce((sum, value) => sum + value, 0);
    expect(total).to.be.closeTo(1, 1e-12);
    for (const value of scored.probability) expect(Number.isFinite(value)).to.equal(true);
  });

  it('counts conflicts per taxon', () => {
    const compiled = compileMatrix(arithmeticMatrix());
    const scored = scoreObservations(
      compiled,
      prepareObservations(compiled, [
        { trait: 'leaf-arrangement', values: ['whorled'] },
        { trait: 'needle-length', value: 30 },
      ]),
    );
    // whorled is coded for nobody (d is unknown); 30 cm is outside a and c, inside b, unknown for d
    expect([...scored.conflicts]).to.deep.equal([2, 1, 2, 0]);
  });
});

describe('internals: texts', () => {
  it('formats numbers exactly as rounding to hundredths and printing the result would', () => {
    // the reference is the language's own number-to-string of the rounded value
    fc.assert(
      fc.property(
        fc.oneof(
          fc.double({ noNaN: true }),
          fc.double({ min: 0, max: 1000, noNaN: true }),
          fc.integer({ min: 0, max: 100000 }).map((n) => n / 100),
        ),
        (value) => {
          expect(formatNumber(value)).to.equal(String(Math.round(value * 100) / 100));
        },
      ),
      { numRuns: 2000 },
    );
    expect([12, 12.5, 12.05, 0.004, 2.999, -1.5, 1e20].map(formatNumber)).to.deep.equal(['12', '12.5', '12.05', '0', '3', '-1.5', '100000000000000000000']);
  });
});

describe('internals: sentences', () => {
  it('lowers a value label inside a sentence, but not initialisms, single letters or numbers', () => {
    expect(['Deeply furrowed', 'Needles', 'U- or V-shaped', 'US', '3 per bundle', 'already small', 'A'].map(inSentence)).to.deep.equal([
      'deeply furrowed',
      'needles',
      'U- or V-shaped',
      'US',
      '3 per bundle',
      'already small',
      'A',
    ]);
  });

  it('writes the labels of seen and coded values in lower case inside reasons', () => {
    const compiled = compileMatrix(loadReferenceMatrix());
    const ranked = rank(compiled, [{ trait: 'foliage', values: ['needle'] }], { limit: 200, leeway: 0 });
    const everyone = [...ranked.candidates, ...ranked.ruledOut];
    const pine = everyone.find((c) => c.taxonId === 'pinus-taeda');
    const sweetgum = everyone.find((c) => c.taxonId === 'liquidambar-styraciflua');
    expect(pine?.reasons[0]?.text).to.equal('Foliage form: you saw needles, which is usual for this species.');
    expect(sweetgum?.reasons[0]?.text).to.equal('Foliage form: you saw needles, but this species is usually broad leaves.');
  });
});

describe('internals: conflict counting', () => {
  it('adds flag columns to byte counts four taxa at a time like a plain loop, and to short counts', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 200 }), fc.integer({ min: 1, max: 300 }), fc.integer({ min: 1, max: 2 ** 31 - 1 }), (taxa, observations, seed) => {
        const random = seededRandom(seed);
        const expected = new Array<number>(taxa).fill(0);
        // byte counts only ever see fewer than 256 observations
        const counts = new ConflictCounts(observations < 256 ? paddedBytes(taxa) : new Uint16Array(taxa));
        for (let o = 0; o < observations; o++) {
          const flags = paddedBytes(taxa);
          for (let t = 0; t < taxa; t++) {
            if (random() < 0.4) {
              flags[t] = 1;
              expected[t]++;
            }
          }
          counts.add(wordsOf(flags));
        }
        counts.flush();
        expect([...counts.counts]).to.deep.equal(expected);
      }),
      { numRuns: 120 },
    );
  });
});

describe('internals: scoring ten columns at a time', () => {
  it('gives bit-identical products reading two taxa per word as reading one taxon at a time', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 32, max: 700 }).map((half) => half * 2),
        fc.integer({ min: 1, max: 2 ** 31 - 1 }),
        (taxa, seed) => {
          const random = seededRandom(seed);
          const columns: ScoreColumn[] = Array.from({ length: 10 }, () => {
            const size = 1 + Math.floor(random() * 300);
            return {
              codes: Uint16Array.from({ length: taxa }, () => Math.floor(random() * size)),
              factor: Float64Array.from({ length: size }, () => random()),
            };
          });
          const from = Float64Array.from({ length: taxa }, () => random());
          const one = new Float64Array(taxa);
          const two = new Float64Array(taxa);
          addTen(columns, 0, from, one, true);
          addTenByPairs(columns, 0, from, two);
          for (let t = 0; t < taxa; t++) expect(Object.is(one[t], two[t]), `taxon ${t}`).to.equal(true);
        },
      ),
      { numRuns: 60 },
    );
  });
});

describe('internals: scoring measurements', () => {
  it('scores measurements like their regions one taxon at a time, for even (two per step) and odd taxon counts', () => {
    for (const taxa of [200, 201]) {
      const compiled = compileMatrix(generateSyntheticMatrix({ taxa, traits: 40, seed: taxa, numericShare: 0.6, unknownRate: 0.1, conditionalShare: 0.3 }));
      const random = seededRandom(taxa);
      for (let round = 0; round < 10; round++) {
        const truth = Math.floor(random() * taxa);
        const observations = compiled.traits
          .filter((trait) => trait.kind === 'numeric')
          .map((trait) => drawAnswer(compiled, trait.index, truth, random, 0.3))
          .filter((answer): answer is Observation => answer !== undefined)
          .slice(0, 8);
        const prepared = prepareObservations(compiled, observations);
        const scored = scoreObservations(compiled, prepared, undefined, { withProbabilities: false });
        const fresh = scoreObservations(compiled, prepared, undefined, { withProbabilities: false, forceLogs: true });
        for (let t = 0; t < taxa; t++) {
          let conflicts = 0;
          let logLikelihood = 0;
          for (const observation of scored.active) {
            if (observation.kind !== 'measure') continue;
            const region = measureRegion(compiled, observation, t);
            if (region === 'outside' || region === 'inapplicable') conflicts++;
            logLikelihood += Math.log(regionLikelihood(region, observation.trait.errorRate));
          }
          expect(scored.conflicts[t], `taxa ${taxa}, taxon ${t}`).to.equal(conflicts);
          expect(fresh.conflicts[t]).to.equal(conflicts);
          // the log sums start from the log prior
          expect(fresh.score[t] - Math.log(compiled.priorWeight[t] / compiled.priorWeight.reduce((a, b) => a + b, 0))).to.be.closeTo(logLikelihood, 1e-9);
          expect(exactProbability(scored, t)).to.be.closeTo(exactProbability(fresh, t), 1e-12);
        }
      }
    }
  });
});
