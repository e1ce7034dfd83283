/**
 * rank: the Shortlist and Ruled out lists with probabilities and reasons.
 *
 * Invariant: candidates and ruledOut are each sorted best first (probability, then fewer conflicts,
 * then matrix order) and no taxon appears in both; probabilities are over all taxa.
 */
import { ValueStatus, type CompiledMatrix } from './compiled-matrix';
import { RANK_DEFAULTS, type RankOptions } from './defaults';
import { EngineUsageError, usageMessages } from './errors';
import { rangeOf } from './separation';
import { prepareObservations, type PreparedObservation } from './observations';
import { measureRegion, regionLikelihood } from './likelihood-columns';
import { exactProbability, scoreObservations, scoringScratch, setLinearTotal, type Scored, type SkipCause } from './scoring';
import { observedText, patternText, reasonTexts } from './texts';
import type { Candidate, Observation, RankResult, Reason, ReasonStatus } from './types';

export function resolveCount(name: string, value: number | undefined, fallback: number): number {
  if (value === undefined) return fallback;
  if (value === Infinity) return value;
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 0)
    throw new EngineUsageError(usageMessages.badOption(name, value, 'a whole number ≥ 0'));
  return value;
}

/** how well each value status supports an observation, best first, indexed by ValueStatus */
const STATUS_RANK = new Uint8Array(8);
[ValueStatus.Usual, ValueStatus.Occasional, ValueStatus.Rare, ValueStatus.Unknown, ValueStatus.NotCoded, ValueStatus.Inapplicable].forEach((status, rank) => {
  STATUS_RANK[status] = rank;
});

function setReason(compiled: CompiledMatrix, observation: PreparedObservation & { kind: 'set' }, t: number, cache: ReasonCache): Reason {
  const seen = cache.seenText(observation);
  const trait = observation.trait;
  const pattern = compiled.cellPattern[trait.index * compiled.taxonCount + t];
  const base = trait.likBase + pattern * trait.answerCount;
  let best: number = ValueStatus.Inapplicable;
  let sum = 0;
  for (const answer of observation.answers) {
    const status = compiled.valueStatus[base + answer];
    if (STATUS_RANK[status] < STATUS_RANK[best]) best = status;
    sum += compiled.likelihood[base + answer];
  }
  const likelihood = Math.min(1, sum);
  let status: ReasonStatus;
  let text: string;
  switch (best) {
    case ValueStatus.Usual:
      status = 'matched';
      text = cache.matchedText(observation);
      break;
    case ValueStatus.Occasional:
    case ValueStatus.Rare:
      status = 'partial';
      text = reasonTexts.partial(trait, seen, patternText(compiled, trait, pattern));
      break;
    case ValueStatus.Unknown:
      status = 'not-coded';
      text = reasonTexts.notCoded(trait);
      break;
    case ValueStatus.NotCoded:
      status = 'conflict';
      text = reasonTexts.conflict(trait, seen, patternText(compiled, trait, pattern));
      break;
    default:
      status = 'conflict';
      text = reasonTexts.doesNotApply(trait);
  }
  return { trait: trait.code, status, likelihood, text };
}

function measureReason(compiled: CompiledMatrix, observation: PreparedObservation & { kind: 'measure' }, t: number, seen: string): Reason {
  const trait = observation.trait;
  const region = measureRegion(compiled, observation, t);
  const likelihood = regionLikelihood(region, trait.errorRate);
  if (region === 'unknown') return { trait: trait.code, status: 'not-coded', likelihood, text: reasonTexts.notCoded(trait) };
  if (region === 'inapplicable') return { trait: trait.code, status: 'conflict', likelihood, text: reasonTexts.doesNotApply(trait) };
  // the three remaining regions only arise for a coded range
  const range = rangeOf(compiled, trait, t);
  if (region === 'typical') return { trait: trait.code, status: 'matched', likelihood, text: reasonTexts.typical(trait, seen, range.low, range.high) };
  if (region === 'extreme') return { trait: trait.code, status: 'partial', likelihood, text: reasonTexts.extreme(trait, seen, range) };
  return { trait: trait.code, status: 'conflict', likelihood, text: reasonTexts.outside(trait, seen, range.min, range.max) };
}

/**
 * What one ranking builds once and shares between its candidates, per observation: its text, its
 * reason when it was set aside, and the reasons of a set observation, which depend only on the
 * cell's pattern (shared objects: read only).
 */
export class ReasonCache {
  private readonly seen: Array<string | undefined> = [];
  private readonly setAside: Array<Reason | undefined> = [];
  private readonly byPattern: Array<Array<Reason | undefined> | undefined> = [];

  private readonly matched: Array<string | undefined> = [];

  seenText(observation: PreparedObservation): string {
    return (this.seen[observation.index] ??= observedText(observation));
  }

  /** "matched" does not depend on the taxon's coding beyond its status, so its text is built once */
  matchedText(observation: PreparedObservation): string {
    return (this.matched[observation.index] ??= reasonTexts.matched(observation.trait, this.seenText(observation)));
  }

  skippedReason(compiled: CompiledMatrix, observation: PreparedObservation, cause: SkipCause): Reason {
    return (this.setAside[observation.index] ??= {
      trait: observation.trait.code,
      status: 'not-applicable',
      likelihood: 1,
      text: reasonTexts.skipped(compiled, observation.trait, cause),
    });
  }

  patternReasons(observation: PreparedObservation): Array<Reason | undefined> {
    return (this.byPattern[observation.index] ??= []);
  }
}

/** Per-observation reasons for one taxon, in the order the observations were given. */
export function reasonsFor(
  compiled: CompiledMatrix,
  prepared: readonly PreparedObservation[],
  skipped: ReadonlyMap<number, SkipCause>,
  t: number,
  cache = new ReasonCache(),
): Reason[] {
  const reasons: Reason[] = [];
  const n = compiled.taxonCount;
  for (const observation of prepared) {
    const cause = skipped.size > 0 ? skipped.get(observation.index) : undefined;
    if (cause) {
      reasons.push(cache.skippedReason(compiled, observation, cause));
    } else if (observation.kind === 'measure') {
      reasons.push(measureReason(compiled, observation, t, cache.seenText(observation)));
    } else {
      const byPattern = cache.patternReasons(observation);
      const pattern = compiled.cellPattern[observation.trait.index * n + t];
      reasons.push((byPattern[pattern] ??= setReason(compiled, observation, t, cache)));
    }
  }
  return reasons;
}

/** True when taxon a ranks before taxon b. */
function before(scored: Scored, a: number, b: number): boolean {
  const pa = scored.score[a];
  const pb = scored.score[b];
  if (pa !== pb) return pa > pb;
  const ca = scored.conflicts[a];
  const cb = scored.conflicts[b];
  if (ca !== cb) return ca < cb;
  return a < b;
}

/** above this limit a full sort beats keeping a sorted short list */
const INSERTION_LIMIT = 64;

/**
 * The best `limit` taxa offered, best first. `worst` is the score a taxon must reach to be worth
 * offering, so the caller turns most taxa away with one comparison and no call.
 */
class BestList {
  readonly items: number[] = [];
  total = 0;
  worst: number;
  constructor(
    private readonly scored: Scored,
    private readonly limit: number,
  ) {
    this.worst = limit === 0 ? Infinity : -Infinity;
  }

  offer(t: number): void {
    const items = this.items;
    if (this.limit > INSERTION_LIMIT) {
      items.push(t);
      return;
    }
    if (items.length === this.limit && !before(this.scored, t, items[items.length - 1])) return;
    let at = items.length;
    while (at > 0 && before(this.scored, t, items[at - 1])) at--;
    items.splice(at, 0, t);
    if (items.length > this.limit) items.pop();
    if (items.length === this.limit) this.worst = this.scored.score[items[items.length - 1]];
  }

  best(): number[] {
    if (this.limit <= INSERTION_LIMIT) return this.items;
    return this.items.sort((a, b) => (before(this.scored, a, b) ? -1 : before(this.scored, b, a) ? 1 : 0)).slice(0, this.limit);
  }
}

/**
 * Sorts every taxon into the kept or the dropped list by its conflicts, in one tight pass: the list
 * is picked by index rather than by a branch (whether a taxon is kept is unpredictable), and most
 * taxa fall below their list's bar and cost one predictable comparison. Returns the sum of the
 * scores, summed on the way.
 */
function select(scored: Scored, leeway: number, kept: BestList, dropped: BestList): number {
  const score = scored.score;
  const conflicts = scored.conflicts;
  const n = score.length;
  const lists = [dropped, kept];
  const bars = Float64Array.of(dropped.worst, kept.worst);
  let keptTotal = 0;
  let total = 0;
  for (let t = 0; t < n; t++) {
    const value = score[t];
    total += value;
    const isKept = +(conflicts[t] <= leeway);
    keptTotal += isKept;
    if (value >= bars[isKept]) {
      const list = lists[isKept];
      list.offer(t);
      bars[isKept] = list.worst;
    }
  }
  kept.total = keptTotal;
  dropped.total = n - keptTotal;
  return total;
}

function toCandidate(compiled: CompiledMatrix, scored: Scored, prepared: readonly PreparedObservation[], t: number, cache: ReasonCache): Candidate {
  return {
    taxonId: compiled.taxa[t].id,
    probability: exactProbability(scored, t),
    conflicts: scored.conflicts[t],
    reasons: reasonsFor(compiled, prepared, scored.skipped, t, cache),
  };
}

/**
 * Ranks every taxon against the observations. Each observed trait multiplies a taxon's weight by
 * P(observation | taxon), so one wrong answer lowers a taxon rather than removing it; taxa with more
 * than `leeway` conflicts go to ruledOut. Throws ObservationError for invalid observations.
 */
export function rank(compiled: CompiledMatrix, observations: readonly Observation[], options: RankOptions = {}): RankResult {
  const leeway = resolveCount('leeway', options.leeway, RANK_DEFAULTS.leeway);
  const limit = resolveCount('limit', options.limit, RANK_DEFAULTS.limit);
  const prepared = prepareObservations(compiled, observations);
  // the scored arrays are this matrix's scratch: everything needed from them is read before returning
  const scored = scoreObservations(compiled, prepared, options.priors, { withProbabilities: false, scratch: scoringScratch(compiled), totalByCaller: true });
  const kept = new BestList(scored, limit);
  const dropped = new BestList(scored, limit);
  const total = select(scored, leeway, kept, dropped);
  if (scored.linear && compiled.taxonCount > 0) setLinearTotal(scored, total);
  const skipped = [...scored.skipped.entries()].map(([index, cause]) => {
    const observation = prepared.find((item) => item.index === index)!;
    return { trait: observation.trait.code, reason: reasonTexts.skipped(compiled, observation.trait, cause) };
  });
  const cache = new ReasonCache();
  return {
    candidates: kept.best().map((t) => toCandidate(compiled, scored, prepared, t, cache)),
    ruledOut: dropped.best().map((t) => toCandidate(compiled, scored, prepared, t, cache)),
    skipped,
    totalCandidates: kept.total,
    totalRuledOut: dropped.total,
  };
}
