/**
 * Simulation of sifts: how many questions the engine's suggestions need and how often the right
 * taxon ends first or in the top three, against strict elimination, a fixed order and a random
 * order; the information-theoretic lower bound; the exact optimum on small random matrices; and
 * the calibration of the leader's probability.
 *
 *   npm run eval             full run
 *   npm run eval -- --quick  fewer matrices and repeats (a smoke test)
 *   npm run eval -- --json   the figures as JSON
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { compileMatrix, entropy, generateSyntheticMatrix, seededRandom, suggest, type CompiledMatrix, type MatrixDocument } from '@shared/engine';
import { optimalExpectedQuestions } from './lib/engine-optimum';
import { simulateSift, type Policy, type SiftOutcome } from './lib/engine-sim';

const args = new Set(process.argv.slice(2));
const quick = args.has('--quick');
const asJson = args.has('--json');
/** `--only=synthetic`, `--only=reference` or `--only=optimum` runs one part */
const only = [...args].find((arg) => arg.startsWith('--only='))?.slice('--only='.length);
const runs = (part: string): boolean => only === undefined || only === part;
const CONFIDENT_AT = 0.95;
const ERROR_RATES = [0, 0.05, 0.1];
const POLICIES = ['engine', 'strict elimination', 'fixed order', 'random order'] as const;
/** the engine told that every part is always seen, for sifts on trees that do not always show flowers, fruit or cones */
const ASSUMES_SEEN = 'engine, all seen';
type PolicyName = (typeof POLICIES)[number] | typeof ASSUMES_SEEN;
/** sifts on standing trees whose flowers, fruit and cones are sometimes missing: the engine against itself told every part is there */
const MISSING_PARTS_POLICIES: readonly PolicyName[] = ['engine', ASSUMES_SEEN, 'fixed order'];

interface Row {
  matrix: string;
  errorRate: number;
  policy: PolicyName;
  sifts: number;
  meanQuestions: number;
  maxQuestions: number;
  top1: number;
  top3: number;
  /** expected calibration error of the leader's probability, 10 equal-width bins */
  calibrationError: number;
}

function log(message: string): void {
  if (!asJson) console.log(message);
}

/** Expected calibration error (Naeini, Cooper & Hauskrecht 2015): Σ_bins (n_b / N) · |accuracy_b − confidence_b|. */
export function expectedCalibrationError(outcomes: ReadonlyArray<{ confidence: number; correct: boolean }>, bins = 10): number {
  const count = new Array<number>(bins).fill(0);
  const confidence = new Array<number>(bins).fill(0);
  const correct = new Array<number>(bins).fill(0);
  for (const outcome of outcomes) {
    const bin = Math.min(bins - 1, Math.floor(outcome.confidence * bins));
    count[bin]++;
    confidence[bin] += outcome.confidence;
    correct[bin] += outcome.correct ? 1 : 0;
  }
  let total = 0;
  for (let b = 0; b < bins; b++) if (count[b] > 0) total += (count[b] / outcomes.length) * Math.abs(correct[b] / count[b] - confidence[b] / count[b]);
  return total;
}

/** A document whose every trait has error rate p: the engine is told how reliable the observers are. */
function withErrorRate(doc: MatrixDocument, errorRate: number): MatrixDocument {
  return { ...doc, traits: doc.traits.map((trait) => ({ ...trait, errorRate })) };
}

function fixedOrder(compiled: CompiledMatrix): number[] {
  const first = suggest(compiled, [], { limit: compiled.traits.length, lookaheadMaxCandidates: 0 });
  const ranked = first.map((item) => compiled.traitIndexByCode.get(item.trait) as number);
  return [...ranked, ...compiled.traits.map((trait) => trait.index).filter((j) => !ranked.includes(j))];
}

function policyFor(name: PolicyName, compiled: CompiledMatrix, order: number[], seed: number): { policy: Policy; strict: boolean } {
  switch (name) {
    case 'engine':
      return { policy: { kind: 'engine' }, strict: false };
    case 'strict elimination':
      return { policy: { kind: 'engine' }, strict: true };
    case 'fixed order':
      return { policy: { kind: 'fixed', order }, strict: false };
    case 'random order':
      return { policy: { kind: 'random', random: seededRandom(seed) }, strict: false };
    case ASSUMES_SEEN:
      return { policy: { kind: 'engine', assumeSeen: true }, strict: false };
  }
}

function evaluateMatrix(
  label: string,
  doc: MatrixDocument,
  errorRate: number,
  repeats: number,
  matchErrorRate: boolean,
  policies: readonly PolicyName[] = POLICIES,
  partsMissing = false,
): Row[] {
  const compiled = compileMatrix(matchErrorRate ? withErrorRate(doc, errorRate) : doc);
  const order = fixedOrder(compiled);
  const rows: Row[] = [];
  for (const name of policies) {
    const outcomes: Array<SiftOutcome & { truth: string }> = [];
    for (let repeat = 0; repeat < repeats; repeat++) {
      for (let t = 0; t < compiled.taxonCount; t++) {
        const seed = 1 + repeat * 100_003 + t * 7919 + Math.round(errorRate * 1000);
        const { policy, strict } = policyFor(name, compiled, order, seed * 31);
        const outcome = simulateSift(compiled, t, seededRandom(seed), policy, { confidentAt: CONFIDENT_AT, errorRate, strict, partsMissing });
        outcomes.push({ ...outcome, truth: compiled.taxa[t].id });
      }
    }
    const questions = outcomes.map((outcome) => outcome.questions);
    rows.push({
      matrix: label,
      errorRate,
      policy: name,
      sifts: outcomes.length,
      meanQuestions: questions.reduce((sum, value) => sum + value, 0) / outcomes.length,
      maxQuestions: Math.max(...questions),
      top1: outcomes.filter((outcome) => outcome.leader === outcome.truth).length / outcomes.length,
      top3: outcomes.filter((outcome) => outcome.top3.includes(outcome.truth)).length / outcomes.length,
      calibrationError: expectedCalibrationError(
        outcomes.map((outcome) => ({ confidence: outcome.leaderProbability, correct: outcome.leader === outcome.truth })),
      ),
    });
  }
  return rows;
}

/** Entropy of the prior divided by log2 of the most answers any trait has: no strategy can average fewer questions. */
function lowerBound(compiled: CompiledMatrix): number {
  const widest = Math.max(2, ...compiled.traits.map((trait) => (trait.kind === 'numeric' ? trait.bandCuts.length + 1 : trait.answerCount)));
  return entropy(compiled.priorWeight) / Math.log2(widest);
}

interface OptimumSummary {
  matrices: number;
  meanOptimum: number;
  meanEngine: number;
  meanGreedy: number;
  /** average over matrices of engine / optimum − 1 */
  engineExcessMean: number;
  engineExcessWorst: number;
  greedyExcessMean: number;
  greedyExcessWorst: number;
}

function meanQuestions(compiled: CompiledMatrix, lookahead: boolean): number {
  let total = 0;
  for (let t = 0; t < compiled.taxonCount; t++) {
    const outcome = simulateSift(
      compiled,
      t,
      seededRandom(t + 1),
      { kind: 'engine', assumeSeen: true, ...(lookahead ? {} : { lookaheadMaxCandidates: 0 }) },
      { confidentAt: CONFIDENT_AT, errorRate: 0 },
    );
    if (outcome.leader !== compiled.taxa[t].id && outcome.leaderProbability >= CONFIDENT_AT)
      throw new Error(`error-free sift for ${compiled.taxa[t].id} ended on ${outcome.leader}`);
    total += outcome.questions;
  }
  return total / compiled.taxonCount;
}

function compareWithOptimum(count: number): OptimumSummary {
  let optimum = 0;
  let engine = 0;
  let greedy = 0;
  const engineExcess: number[] = [];
  const greedyExcess: number[] = [];
  for (let i = 0; i < count; i++) {
    const random = seededRandom(9000 + i);
    const doc = generateSyntheticMatrix({
      taxa: 10,
      traits: 5 + Math.floor(random() * 6),
      seed: 9000 + i,
      singleValued: true,
      ease: 1,
      errorRate: 0,
      uniformPriors: true,
      season: 'any',
      minValues: 2,
      maxValues: 4,
      genusSize: 3,
    });
    const compiled = compileMatrix(doc);
    const best = optimalExpectedQuestions(compiled);
    const withLookahead = meanQuestions(compiled, true);
    const plain = meanQuestions(compiled, false);
    optimum += best;
    engine += withLookahead;
    greedy += plain;
    engineExcess.push(best > 0 ? withLookahead / best - 1 : 0);
    greedyExcess.push(best > 0 ? plain / best - 1 : 0);
  }
  const mean = (values: number[]): number => values.reduce((sum, value) => sum + value, 0) / values.length;
  return {
    matrices: count,
    meanOptimum: optimum / count,
    meanEngine: engine / count,
    meanGreedy: greedy / count,
    engineExcessMean: mean(engineExcess),
    engineExcessWorst: Math.max(...engineExcess),
    greedyExcessMean: mean(greedyExcess),
    greedyExcessWorst: Math.max(...greedyExcess),
  };
}

function percent(value: number): string {
  return `${(value * 100).toFixed(1)}%`;
}

function printRows(rows: Row[]): void {
  log('matrix                      p     policy               sifts  mean q  max q   top-1   top-3    ECE');
  for (const row of rows) {
    log(
      `${row.matrix.padEnd(27)} ${row.errorRate.toFixed(2)}  ${row.policy.padEnd(20)} ${String(row.sifts).padStart(5)}  ${row.meanQuestions.toFixed(2).padStart(6)}  ${String(row.maxQuestions).padStart(5)}  ${percent(row.top1).padStart(6)}  ${percent(row.top3).padStart(6)}  ${row.calibrationError.toFixed(3)}`,
    );
  }
}

function pooled(rows: Row[], matrixLabel: string): Row[] {
  const result: Row[] = [];
  for (const errorRate of ERROR_RATES) {
    for (const policy of POLICIES) {
      const group = rows.filter((row) => row.errorRate === errorRate && row.policy === policy);
      if (group.length === 0) continue;
      const sifts = group.reduce((sum, row) => sum + row.sifts, 0);
      const weighted = (pick: (row: Row) => number): number => group.reduce((sum, row) => sum + pick(row) * row.sifts, 0) / sifts;
      result.push({
        matrix: matrixLabel,
        errorRate,
        policy,
        sifts,
        meanQuestions: weighted((row) => row.meanQuestions),
        maxQuestions: Math.max(...group.map((row) => row.maxQuestions)),
        top1: weighted((row) => row.top1),
        top3: weighted((row) => row.top3),
        calibrationError: weighted((row) => row.calibrationError),
      });
    }
  }
  return result;
}

async function loadReference(): Promise<MatrixDocument | undefined> {
  const path = fileURLToPath(new URL('../seeds/load-matrix.ts', import.meta.url));
  if (!existsSync(path)) return undefined;
  const module = (await import(path)) as { loadReferenceMatrix?: () => MatrixDocument | Promise<MatrixDocument> };
  return module.loadReferenceMatrix ? await module.loadReferenceMatrix() : undefined;
}

async function main(): Promise<void> {
  const started = performance.now();
  const syntheticSeeds = quick ? [11] : [11, 12, 13];
  const repeats = quick ? 1 : 3;
  const syntheticRows: Row[] = [];
  const bounds: number[] = [];
  for (const seed of runs('synthetic') ? syntheticSeeds : []) {
    const doc = generateSyntheticMatrix({ taxa: 50, traits: 25, seed, unknownRate: 0.02 });
    bounds.push(lowerBound(compileMatrix(doc)));
    for (const errorRate of ERROR_RATES) syntheticRows.push(...evaluateMatrix(`synthetic 50×25 #${seed}`, doc, errorRate, repeats, true));
    log(`… synthetic matrix ${seed} done (${((performance.now() - started) / 1000).toFixed(0)} s)`);
  }
  const syntheticPooled = pooled(syntheticRows, `synthetic 50×25 ×${syntheticSeeds.length}`);
  if (syntheticRows.length > 0) {
    log("\nSynthetic matrices (the engine is told the observers' error rate p):");
    printRows(syntheticPooled);
    log(`lower bound on mean questions (H(prior) / log2 of the widest trait): ${(bounds.reduce((a, b) => a + b, 0) / bounds.length).toFixed(2)}`);
  }

  let referenceRows: Row[] = [];
  let referenceBound: number | undefined;
  const reference = !runs('reference')
    ? null
    : await loadReference().catch((error: unknown) => {
        log(`\nReference matrix: could not be loaded (${error instanceof Error ? error.message : String(error)}); skipped.`);
        return undefined;
      });
  if (reference) {
    const compiled = compileMatrix(reference);
    referenceBound = lowerBound(compiled);
    for (const errorRate of ERROR_RATES) referenceRows.push(...evaluateMatrix(`reference (as coded)`, reference, errorRate, repeats, false));
    for (const errorRate of ERROR_RATES) referenceRows.push(...evaluateMatrix(`reference (p told)`, reference, errorRate, repeats, true));
    log(`\nReference matrix "${reference.title}" (${compiled.taxonCount} taxa × ${compiled.traits.length} traits):`);
    printRows(referenceRows);
    log(`lower bound on mean questions: ${referenceBound.toFixed(2)}`);
    const missingRows = evaluateMatrix('reference, parts missing', reference, 0.05, repeats, false, MISSING_PARTS_POLICIES, true);
    log(
      '\nReference matrix on standing trees whose flowers, fruit and cones are sometimes missing (a question about a missing part is asked and goes unanswered):',
    );
    printRows(missingRows);
    referenceRows.push(...missingRows);
  } else if (reference === undefined) {
    log('\nReference matrix: seeds/load-matrix.ts (loadReferenceMatrix) is not there yet; skipped.');
    referenceRows = [];
  }

  const optimumCount = quick ? 30 : 200;
  const optimum = runs('optimum') ? compareWithOptimum(optimumCount) : undefined;
  if (optimum) {
    log(`\nExact optimum (DP over candidate subsets) on ${optimum.matrices} random error-free matrices of 10 taxa, ease 1:`);
    log(
      `  mean expected questions: optimum ${optimum.meanOptimum.toFixed(3)}, engine with lookahead ${optimum.meanEngine.toFixed(3)}, greedy entropy only ${optimum.meanGreedy.toFixed(3)}`,
    );
    log(`  engine above optimum: mean ${percent(optimum.engineExcessMean)}, worst matrix ${percent(optimum.engineExcessWorst)}`);
    log(`  greedy above optimum: mean ${percent(optimum.greedyExcessMean)}, worst matrix ${percent(optimum.greedyExcessWorst)}`);
  }
  log(`\n(${((performance.now() - started) / 1000).toFixed(0)} s)`);
  if (asJson)
    console.log(
      JSON.stringify(
        { synthetic: syntheticPooled, syntheticLowerBound: bounds, reference: referenceRows, referenceLowerBound: referenceBound, optimum },
        null,
        2,
      ),
    );
}

await main();
