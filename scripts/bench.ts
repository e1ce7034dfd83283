/**
 * Speed and memory of the engine, all figures from one run.
 *
 *   npm run bench              a table
 *   npm run bench -- --json    the same figures as JSON
 *   npm run bench -- --quick   fewer repetitions and no 100,000-taxa matrix (a smoke test)
 *
 * The machine is shared and noisy, so every timing is a median, CPU time is shown beside wall time,
 * and the comparisons are also given as ratios measured in the same run; rank and its floor are
 * timed turn about, call by call.
 */
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';
import {
  compileMatrix,
  decodeBundle,
  encodeBundle,
  generateSyntheticMatrix,
  prepareObservations,
  rank,
  seededRandom,
  suggest,
  type CompiledMatrix,
  type Observation,
} from '@shared/engine';
import { drawAnswer } from './lib/engine-sim';
import { all, buildSqliteBaseline, rankingQuery, type SqlRow } from './lib/engine-sqlite';

const args = new Set(process.argv.slice(2));
const asJson = args.has('--json');
const quick = args.has('--quick');

interface Timing {
  /** median wall-clock milliseconds per call */
  medianMs: number;
  /** median CPU milliseconds per call (user + system) */
  cpuMs: number;
  runs: number;
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = sorted.length >> 1;
  return sorted.length % 2 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

function time(runs: number, work: (run: number) => unknown, warmup = Math.min(20, runs)): Timing {
  for (let i = 0; i < warmup; i++) work(i);
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < runs; i++) {
    const cpuStart = process.cpuUsage();
    const start = performance.now();
    work(i);
    wall.push(performance.now() - start);
    const used = process.cpuUsage(cpuStart);
    cpu.push((used.user + used.system) / 1000);
  }
  return { medianMs: median(wall), cpuMs: median(cpu), runs };
}

/**
 * Times two kinds of work turn about, one call of each per round, so that a busy spell on the shared
 * machine slows both alike and their ratio stays honest.
 */
function timeInTurn(runs: number, first: (run: number) => unknown, second: (run: number) => unknown, warmup = Math.min(20, runs)): [Timing, Timing] {
  for (let i = 0; i < warmup; i++) {
    first(i);
    second(i);
  }
  const samples = [first, second].map(() => ({ wall: [] as number[], cpu: [] as number[] }));
  for (let i = 0; i < runs; i++) {
    [first, second].forEach((work, k) => {
      const cpuStart = process.cpuUsage();
      const start = performance.now();
      work(i);
      samples[k].wall.push(performance.now() - start);
      const used = process.cpuUsage(cpuStart);
      samples[k].cpu.push((used.user + used.system) / 1000);
    });
  }
  const [a, b] = samples.map(({ wall, cpu }) => ({ medianMs: median(wall), cpuMs: median(cpu), runs }));
  return [a, b];
}

async function timeAsync(runs: number, work: (run: number) => Promise<unknown>, warmup = 2): Promise<Timing> {
  for (let i = 0; i < warmup; i++) await work(i);
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < runs; i++) {
    const cpuStart = process.cpuUsage();
    const start = performance.now();
    await work(i);
    wall.push(performance.now() - start);
    const used = process.cpuUsage(cpuStart);
    cpu.push((used.user + used.system) / 1000);
  }
  return { medianMs: median(wall), cpuMs: median(cpu), runs };
}

function log(message: string): void {
  if (!asJson) console.log(message);
}

/** Ten observations drawn from the coding of a random taxon, with a 5 % chance of a wrong answer each. */
function observationSets(compiled: CompiledMatrix, count: number, perSet: number, seed: number): Observation[][] {
  const random = seededRandom(seed);
  const sets: Observation[][] = [];
  while (sets.length < count) {
    const t = Math.floor(random() * compiled.taxonCount);
    const traits = compiled.traits.map((trait) => trait.index).sort(() => random() - 0.5);
    const observations: Observation[] = [];
    for (const j of traits) {
      if (observations.length === perSet) break;
      const answer = drawAnswer(compiled, j, t, random, 0.05);
      if (answer) observations.push(answer);
    }
    sets.push(observations);
  }
  return sets;
}

/**
 * The floor: the observations resolved to their columns (the same checks rank makes), then one bare
 * pass over the same cells a ranking reads (each observed trait's pattern column, and the four range
 * columns of numeric traits), summed into a checksum so nothing is optimised away.
 */
function bareScan(compiled: CompiledMatrix, observations: readonly Observation[]): number {
  const n = compiled.taxonCount;
  const patterns = compiled.cellPattern;
  const ranges = compiled.ranges;
  let checksum = 0;
  for (const observation of prepareObservations(compiled, observations)) {
    const base = observation.trait.index * n;
    if (observation.kind === 'set') {
      for (let t = 0; t < n; t++) checksum += patterns[base + t];
    } else {
      const block = observation.trait.numericIndex * 4 * n;
      for (let t = 0; t < n; t++)
        checksum += patterns[base + t] + ranges[block + t] + ranges[block + n + t] + ranges[block + 2 * n + t] + ranges[block + 3 * n + t];
    }
  }
  return checksum;
}

function compiledBytes(compiled: CompiledMatrix): number {
  return [
    compiled.priorWeight,
    compiled.cellPattern,
    compiled.masks,
    compiled.likelihood,
    compiled.logLikelihood,
    compiled.valueStatus,
    compiled.ranges,
    compiled.overrideKeys,
    compiled.overrideCoded,
  ].reduce((sum, array) => sum + array.byteLength, 0);
}

/** A garbage collection on demand, so retained memory can be measured (the flag must be set before use). */
setFlagsFromString('--expose-gc');
const collectGarbage = runInNewContext('gc') as () => void;

function heapMb(): number {
  const usage = process.memoryUsage();
  return (usage.heapUsed + usage.arrayBuffers) / 1e6;
}

async function main(): Promise<void> {
  const taxa = 10_000;
  const traitCount = 200;
  const reps = quick ? 30 : 300;
  const results: Record<string, unknown> = {
    machine: { cpus: (await import('node:os')).cpus().length, node: process.version, loadAverage: (await import('node:os')).loadavg() },
  };

  log(`Generating a synthetic matrix of ${taxa.toLocaleString()} taxa × ${traitCount} traits …`);
  let start = performance.now();
  const doc = generateSyntheticMatrix({ taxa, traits: traitCount, seed: 2024 });
  const generateMs = performance.now() - start;

  const compileTimes: number[] = [];
  for (let i = 0; i < (quick ? 1 : 3); i++) {
    start = performance.now();
    compileMatrix(doc);
    compileTimes.push(performance.now() - start);
  }
  // retained memory of one compiled matrix: heap and array buffers after full collections (array
  // buffers are released by finalisers, so collect, yield, collect)
  const settle = async (): Promise<void> => {
    for (let i = 0; i < 3; i++) {
      collectGarbage();
      await new Promise((resolve) => setImmediate(resolve));
    }
  };
  await settle();
  const heapBefore = heapMb();
  const compiled = compileMatrix(doc);
  await settle();
  const heapAfter = heapMb();
  const arraysBytes = compiledBytes(compiled);
  const bundle = encodeBundle(compiled);
  const encodeMs = time(quick ? 2 : 5, () => encodeBundle(compiled), 1).medianMs;
  const decode = time(quick ? 3 : 10, () => decodeBundle(bundle), 1);
  results['compile'] = {
    taxa,
    traits: traitCount,
    generateMs,
    compileMedianMs: median(compileTimes),
    compileRuns: compileTimes.length,
    typedArraysMB: arraysBytes / 1e6,
    bundleMB: bundle.length / 1e6,
    retainedMB: heapAfter - heapBefore,
    encodeMs,
    decodeMs: decode.medianMs,
  };

  // rank, 10 observations, against the floor and SQLite
  const sets = observationSets(compiled, 20, 10, 7);
  const [rankTiming, floorTiming] = timeInTurn(
    reps,
    (i) => rank(compiled, sets[i % sets.length]),
    (i) => bareScan(compiled, sets[i % sets.length]),
  );
  log('Building the SQLite baseline (indexed (taxon, trait, value) table) …');
  start = performance.now();
  const db = await buildSqliteBaseline(compiled);
  const sqliteBuildMs = performance.now() - start;
  const queries = sets.map((observations) => rankingQuery(compiled, observations, 20));
  const sqliteTiming = await timeAsync(quick ? 3 : 15, (i) => all<SqlRow>(db, queries[i % queries.length].sql, queries[i % queries.length].params));
  // the SQL must rank like the engine
  let agreeing = 0;
  for (let i = 0; i < sets.length; i++) {
    const rows = await all<SqlRow>(db, queries[i].sql, queries[i].params);
    const engineTop = rank(compiled, sets[i], { leeway: Infinity, limit: 20 }).candidates.map((candidate) => candidate.taxonId);
    const sqlTop = rows.map((row) => compiled.taxa[row.taxon].id);
    if (engineTop.join() === sqlTop.join()) agreeing++;
  }
  await new Promise<void>((resolve) => db.close(() => resolve()));
  results['rank'] = {
    observations: 10,
    engine: rankTiming,
    floor: floorTiming,
    sqlite: sqliteTiming,
    sqliteBuildMs,
    sqliteAgreesOnTop20: `${agreeing}/${sets.length}`,
    engineOverFloor: rankTiming.medianMs / floorTiming.medianMs,
    engineOverFloorCpu: rankTiming.cpuMs / Math.max(floorTiming.cpuMs, 1e-3),
    sqliteOverEngine: sqliteTiming.medianMs / rankTiming.medianMs,
  };

  // suggest over the remaining traits with 10,000 candidates (two answers that rule nobody out yet)
  const twoObservations = observationSets(compiled, 5, 2, 11);
  const coldStart = performance.now();
  const firstSuggestions = suggest(compiled, twoObservations[0]);
  const suggestColdMs = performance.now() - coldStart;
  const candidatesLeft = rank(compiled, twoObservations[0], { limit: 0 }).totalCandidates;
  const suggestTiming = time(quick ? 5 : 25, (i) => suggest(compiled, twoObservations[i % twoObservations.length]), 3);
  results['suggest'] = {
    candidates: candidatesLeft,
    traitsConsidered: traitCount - 2,
    coldFirstCallMs: suggestColdMs,
    ...suggestTiming,
    top: firstSuggestions[0]?.trait,
  };

  // growth: rank at 1,000, 10,000 and 100,000 taxa (50 traits, so the largest fits comfortably)
  const growth: Array<{ taxa: number; medianMs: number; cpuMs: number }> = [];
  for (const size of quick ? [1_000, 10_000] : [1_000, 10_000, 100_000]) {
    const grown = compileMatrix(generateSyntheticMatrix({ taxa: size, traits: 50, seed: 99 }));
    const growthSets = observationSets(grown, 20, 10, 5);
    const timing = time(size >= 100_000 ? 60 : reps, (i) => rank(grown, growthSets[i % growthSets.length]));
    growth.push({ taxa: size, medianMs: timing.medianMs, cpuMs: timing.cpuMs });
  }
  const growthRatios = growth
    .slice(1)
    .map((row, i) => ({ from: growth[i].taxa, to: row.taxa, ratio: row.medianMs / growth[i].medianMs, cpuRatio: row.cpuMs / Math.max(growth[i].cpuMs, 1e-3) }));
  results['growth'] = { rows: growth, ratios: growthRatios };

  const targets = [
    {
      what: 'rank median ≤ 2 ms (10k × 200, 10 obs)',
      ok: rankTiming.medianMs <= 2,
      value: `${rankTiming.medianMs.toFixed(3)} ms (CPU ${rankTiming.cpuMs.toFixed(3)} ms)`,
    },
    {
      what: 'rank ≥ 20× faster than SQLite',
      ok: sqliteTiming.medianMs / rankTiming.medianMs >= 20,
      value: `${(sqliteTiming.medianMs / rankTiming.medianMs).toFixed(0)}×`,
    },
    {
      what: 'rank within 4× of the bare scan',
      ok: rankTiming.medianMs / floorTiming.medianMs <= 4,
      value: `${(rankTiming.medianMs / floorTiming.medianMs).toFixed(2)}× wall, ${(rankTiming.cpuMs / Math.max(floorTiming.cpuMs, 1e-3)).toFixed(2)}× CPU`,
    },
    {
      what: 'suggest median ≤ 30 ms (10k candidates)',
      ok: suggestTiming.medianMs <= 30,
      value: `${suggestTiming.medianMs.toFixed(1)} ms (CPU ${suggestTiming.cpuMs.toFixed(1)} ms)`,
    },
    { what: 'compileMatrix ≤ 2 s (10k × 200)', ok: median(compileTimes) <= 2000, value: `${median(compileTimes).toFixed(0)} ms` },
    {
      what: 'compiled size ≤ 40 MB',
      ok: arraysBytes / 1e6 <= 40 && bundle.length / 1e6 <= 40,
      value: `${(arraysBytes / 1e6).toFixed(1)} MB arrays, ${(bundle.length / 1e6).toFixed(1)} MB bundle, ${(heapAfter - heapBefore).toFixed(1)} MB retained`,
    },
    { what: 'bundle decode ≤ 200 ms', ok: decode.medianMs <= 200, value: `${decode.medianMs.toFixed(1)} ms` },
    ...growthRatios.map((ratio) => ({
      what: `rank growth ${ratio.from.toLocaleString()} → ${ratio.to.toLocaleString()} taxa ≤ 12×`,
      ok: ratio.ratio <= 12,
      value: `${ratio.ratio.toFixed(2)}× wall, ${ratio.cpuRatio.toFixed(2)}× CPU`,
    })),
  ];
  results['targets'] = targets;

  if (asJson) {
    console.log(JSON.stringify(results, null, 2));
    return;
  }
  const rankResult = results['rank'] as { sqliteBuildMs: number; sqliteAgreesOnTop20: string };
  log('');
  log(`machine: ${JSON.stringify(results['machine'])}`);
  log(
    `generate 10k × 200: ${generateMs.toFixed(0)} ms; compile: ${median(compileTimes).toFixed(0)} ms (median of ${compileTimes.length}); encode ${encodeMs.toFixed(0)} ms; decode ${decode.medianMs.toFixed(1)} ms`,
  );
  log(
    `rank 10 obs: engine ${rankTiming.medianMs.toFixed(3)} ms (CPU ${rankTiming.cpuMs.toFixed(3)}), bare scan ${floorTiming.medianMs.toFixed(3)} ms (CPU ${floorTiming.cpuMs.toFixed(3)}), SQLite ${sqliteTiming.medianMs.toFixed(1)} ms (CPU ${sqliteTiming.cpuMs.toFixed(1)}); SQLite build ${rankResult.sqliteBuildMs.toFixed(0)} ms; SQLite top-20 equals the engine's in ${rankResult.sqliteAgreesOnTop20}`,
  );
  log(
    `suggest: ${candidatesLeft} candidates, first call ${suggestColdMs.toFixed(0)} ms (builds band tables), then median ${suggestTiming.medianMs.toFixed(1)} ms`,
  );
  log(`growth: ${growth.map((row) => `${row.taxa.toLocaleString()} taxa ${row.medianMs.toFixed(3)} ms`).join(', ')}`);
  log('');
  log('target                                              result  figure');
  for (const target of targets) log(`${target.what.padEnd(52)} ${target.ok ? 'met   ' : 'MISSED'}  ${target.value}`);
}

await main();
