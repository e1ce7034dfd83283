/**
 * Side by side, diagnostic traits and the matrix health report.
 *
 * Invariant: these read the compiled matrix only and never change it; taxa are named by id in every
 * result, in the order the caller gave them (or matrix order).
 */
import { cellInWords } from './cell-words';
import { INAPPLICABLE_PATTERN, UNKNOWN_PATTERN, type CompiledMatrix, type CompiledTrait } from './compiled-matrix';
import { effectiveCellOf, requireTaxon } from './lookup';
import { relation, separationStrength } from './separation';
import { joinAnd } from './words';
import type {
  ComparisonResult,
  ComparisonVerdict,
  DiagnosisResult,
  DiagnosticSeparation,
  DiagnosticTrait,
  HealthReport,
  SeparationStrength,
  TraitComparison,
} from './types';

function uniqueIndexes(compiled: CompiledMatrix, ids: readonly string[]): number[] {
  return [...new Set(ids)].map((id) => requireTaxon(compiled, id));
}

/** The verdict of one trait over a set, and for `separates` the weakest pair's strength. */
function verdictFor(compiled: CompiledMatrix, trait: CompiledTrait, taxa: readonly number[]): { verdict: ComparisonVerdict; strength?: SeparationStrength } {
  let allSame = true;
  let allSeparate = true;
  let allReliable = true;
  for (let x = 0; x < taxa.length; x++) {
    for (let y = x + 1; y < taxa.length; y++) {
      const found = relation(compiled, trait, taxa[x], taxa[y]);
      if (found === 'unknown') return { verdict: 'not-coded' };
      if (found !== 'same') allSame = false;
      if (found !== 'reliable') allReliable = false;
      if (found !== 'reliable' && found !== 'usual') allSeparate = false;
    }
  }
  if (taxa.length < 2) return { verdict: 'same' };
  if (allSeparate) return { verdict: 'separates', strength: allReliable ? 'reliable' : 'usual' };
  return { verdict: allSame ? 'same' : 'overlaps' };
}

const verdictTexts: Record<ComparisonVerdict, (label: string) => string> = {
  separates: (label) => `${label} tells every one of these apart.`,
  overlaps: (label) => `${label} differs between some of these but overlaps for others.`,
  same: (label) => `${label} is the same for all of these.`,
  'not-coded': (label) => `${label} is not coded for every one of these yet.`,
};

/** What a usual-strength separation can still share, in words. */
function sharedWords(trait: CompiledTrait): string {
  return trait.kind === 'numeric' ? 'lengths near the recorded extremes' : 'less common values';
}

function comparisonText(trait: CompiledTrait, verdict: ComparisonVerdict, strength: SeparationStrength | undefined): string {
  if (verdict === 'separates' && strength === 'usual') {
    return `${trait.label} usually tells every one of these apart, though some of them share ${sharedWords(trait)}.`;
  }
  return verdictTexts[verdict](trait.label);
}

/**
 * Side by side: which traits separate the given taxa (reliably first, then by their usual values or
 * typical ranges only), which overlap, which are the same and which are not coded for all of them.
 */
export function compare(compiled: CompiledMatrix, ids: readonly string[]): ComparisonResult {
  const taxa = uniqueIndexes(compiled, ids);
  const result: ComparisonResult = { taxa: taxa.map((t) => compiled.taxa[t].id), separating: [], overlapping: [], same: [], notCoded: [] };
  const usually: TraitComparison[] = [];
  for (const trait of compiled.traits) {
    const { verdict, strength } = verdictFor(compiled, trait, taxa);
    const cells = Object.fromEntries(taxa.map((t) => [compiled.taxa[t].id, effectiveCellOf(compiled, trait, t)]));
    const entry: TraitComparison = {
      trait: trait.code,
      label: trait.label,
      verdict,
      ...(strength && { strength }),
      cells,
      text: comparisonText(trait, verdict, strength),
    };
    if (verdict === 'separates') (strength === 'reliable' ? result.separating : usually).push(entry);
    else if (verdict === 'overlaps') result.overlapping.push(entry);
    else if (verdict === 'same') result.same.push(entry);
    else result.notCoded.push(entry);
  }
  result.separating.push(...usually);
  return result;
}

function diagnosticText(compiled: CompiledMatrix, trait: CompiledTrait, target: number, separations: readonly DiagnosticSeparation[]): string {
  const coding = cellInWords(trait, effectiveCellOf(compiled, trait, target));
  const reliably = separations.filter((item) => item.strength === 'reliable').map((item) => item.taxonId);
  const usually = separations.filter((item) => item.strength === 'usual').map((item) => item.taxonId);
  const caveat = `they can share ${sharedWords(trait)}`;
  if (usually.length === 0) return `${trait.label} (${coding}) sets it apart from ${joinAnd(reliably)}.`;
  if (reliably.length === 0) return `${trait.label} (${coding}) usually sets it apart from ${joinAnd(usually)}; ${caveat}.`;
  return `${trait.label} (${coding}) sets it apart from ${joinAnd(reliably)}, and usually from ${joinAnd(usually)} (${caveat}).`;
}

/**
 * A small set of traits that together separate one taxon from all others of a set. Finding the
 * smallest such set is set cover, which is NP-hard; this is the greedy approximation (Chvátal 1979,
 * "A greedy heuristic for the set-covering problem"): repeatedly take the trait that separates the
 * most not-yet-separated taxa (ties: easier, then more reliable), which uses at most ln(n) + 1 times
 * as many traits as the smallest set.
 *
 * It runs in two rounds. The first covers with reliable separations only. What is left is then
 * separated by usual values or typical ranges: first by the traits already chosen (they cost
 * nothing more), then greedily by the others. Each chosen trait reports the taxa it set apart and
 * how firmly; `unseparated` lists those no trait separates even by its usual values.
 */
export function diagnose(compiled: CompiledMatrix, id: string, amongIds?: readonly string[]): DiagnosisResult {
  const target = requireTaxon(compiled, id);
  const among = amongIds ? uniqueIndexes(compiled, amongIds) : compiled.taxa.map((_, t) => t);
  const others = among.filter((t) => t !== target);
  const strengths = compiled.traits.map((trait) => new Map(others.map((t) => [t, separationStrength(compiled, trait, target, t)])));
  const uncovered = new Set(others);
  const picks: Array<{ trait: number; separations: Array<{ taxon: number; strength: SeparationStrength }> }> = [];
  const used = new Set<number>();
  const covers = (j: number, t: number, round: SeparationStrength): boolean => {
    const found = strengths[j].get(t);
    return round === 'reliable' ? found === 'reliable' : found !== null && found !== undefined;
  };
  const take = (pick: (typeof picks)[number], j: number, round: SeparationStrength): void => {
    for (const t of others) {
      if (!uncovered.has(t) || !covers(j, t, round)) continue;
      pick.separations.push({ taxon: t, strength: strengths[j].get(t)! });
      uncovered.delete(t);
    }
  };
  const greedy = (round: SeparationStrength): void => {
    while (uncovered.size > 0) {
      let best = -1;
      let bestCount = 0;
      compiled.traits.forEach((trait, j) => {
        if (used.has(j)) return;
        let count = 0;
        for (const t of uncovered) if (covers(j, t, round)) count++;
        if (count === 0) return;
        const incumbent = best >= 0 ? compiled.traits[best] : undefined;
        const better =
          !incumbent ||
          count > bestCount ||
          (count === bestCount && (trait.ease < incumbent.ease || (trait.ease === incumbent.ease && trait.errorRate < incumbent.errorRate)));
        if (better) {
          best = j;
          bestCount = count;
        }
      });
      if (best < 0) return;
      used.add(best);
      const pick = { trait: best, separations: [] };
      take(pick, best, round);
      picks.push(pick);
    }
  };
  greedy('reliable');
  for (const pick of picks) take(pick, pick.trait, 'usual');
  greedy('usual');
  const chosen: DiagnosticTrait[] = picks.map((pick) => {
    const trait = compiled.traits[pick.trait];
    const separations = pick.separations.map((item) => ({ taxonId: compiled.taxa[item.taxon].id, strength: item.strength }));
    return {
      trait: trait.code,
      label: trait.label,
      separates: separations.map((item) => item.taxonId),
      text: diagnosticText(compiled, trait, target, separations),
      separations,
      strength: separations.every((item) => item.strength === 'reliable') ? 'reliable' : 'usual',
    };
  });
  return { taxonId: compiled.taxa[target].id, traits: chosen, unseparated: [...uncovered].map((t) => compiled.taxa[t].id) };
}

function describeCondition(trait: CompiledTrait): string {
  return Object.entries(trait.appliesWhen ?? {})
    .map(([code, values]) => `${code} is ${values.join(' or ')}`)
    .join(' and ');
}

/**
 * Data-quality report of an edition: what the curators should look at.
 *
 * Separation is graded as in `compare` and `diagnose` (see separation.ts): a pair is inseparable
 * when no trait separates it even by its usual values or typical ranges, and weakly separated when
 * some trait does so but none reliably; a trait separates nothing when it separates no pair at
 * either strength.
 */
export function health(compiled: CompiledMatrix): HealthReport {
  const n = compiled.taxonCount;
  const traits = compiled.traits;
  const separatesAnything = new Uint8Array(traits.length);
  const known = new Map(compiled.inseparable.map((pair) => [[...pair.taxa].sort().join('\u0000'), pair.reason]));
  const inseparablePairs: HealthReport['inseparablePairs'] = [];
  const weaklySeparated: HealthReport['weaklySeparated'] = [];
  const usually: string[] = [];
  for (let a = 0; a < n; a++) {
    for (let b = a + 1; b < n; b++) {
      let reliably = false;
      usually.length = 0;
      for (const trait of traits) {
        const strength = separationStrength(compiled, trait, a, b);
        if (strength === null) continue;
        separatesAnything[trait.index] = 1;
        if (strength === 'reliable') {
          reliably = true;
          break;
        }
        usually.push(trait.code);
      }
      if (reliably) continue;
      const taxa: [string, string] = [compiled.taxa[a].id, compiled.taxa[b].id];
      if (usually.length > 0) {
        weaklySeparated.push({ taxa, traits: [...usually] });
        continue;
      }
      const reason = known.get([...taxa].sort().join('\u0000'));
      inseparablePairs.push({ taxa, known: reason !== undefined, ...(reason !== undefined && { reason }) });
    }
  }
  // a trait after the first reliable separator of every pair it separates is not marked yet
  for (const trait of traits) {
    if (separatesAnything[trait.index]) continue;
    search: for (let a = 0; a < n; a++) {
      for (let b = a + 1; b < n; b++) {
        if (separationStrength(compiled, trait, a, b) !== null) {
          separatesAnything[trait.index] = 1;
          break search;
        }
      }
    }
  }
  const emptyCells: HealthReport['emptyCells'] = [];
  let empty = 0;
  for (let t = 0; t < n; t++) {
    const missing = traits.filter((trait) => compiled.cellPattern[trait.index * n + t] === UNKNOWN_PATTERN).map((trait) => trait.code);
    empty += missing.length;
    if (missing.length > 0) emptyCells.push({ taxon: compiled.taxa[t].id, traits: missing });
  }
  const appliesWhenViolations: HealthReport['appliesWhenViolations'] = [];
  compiled.overrideKeys.forEach((key, i) => {
    const coded = compiled.overrideCoded[i];
    if (coded === UNKNOWN_PATTERN || coded === INAPPLICABLE_PATTERN) return;
    const trait = traits[Math.floor(key / n)];
    appliesWhenViolations.push({ taxon: compiled.taxa[key % n].id, trait: trait.code, condition: describeCondition(trait) });
  });
  return {
    inseparablePairs,
    weaklySeparated,
    emptyCells,
    emptyShare: n * traits.length > 0 ? empty / (n * traits.length) : 0,
    traitsSeparatingNothing: n < 2 ? traits.map((trait) => trait.code) : traits.filter((trait) => !separatesAnything[trait.index]).map((trait) => trait.code),
    rangesOutOfOrder: compiled.rangesOutOfOrder,
    appliesWhenViolations,
    warnings: compiled.warnings.filter((problem) => problem.severity === 'warning'),
  };
}
