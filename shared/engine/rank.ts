/**
 * rank: the Shortlist and Ruled out lists with probabilities and reasons.
 *
 * Invariant: candidates and ruledOut are each sorted best first (probability, then fewer conflicts,
 * then matrix order) and no taxon appears in both; probabilities are over all taxa.
 */
import { ValueStatus, type CompiledMatrix } from './compiled';
import { RANK_DEFAULTS, type RankOptions } from './defaults';
import { EngineUsageError, usageMessages } from './errors';
import { effectiveCellOf } from './lookup';
import { rangeOf } from './separation';
import { prepareObservations, type PreparedObservation } from './observations';
import { exactProbability, measureRegion, regionLikelihood, scoreObservations, scoringScratch, type Scored, type SkipCause } from './scoring';
import { codedText, observedText, reasonTexts } from './texts';
import type { Candidate, Observation, RankResult, Reason, ReasonStatus } from './types';

export function resolveCount(name: string, value: number | undefined, fallback: number): number {
  if (value === undefined) return fallback;
  if (value === Infinity) return value;
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 0) throw new EngineUsageError(usageMessages.badOption(name, value, 'a whole number ≥ 0'));
  return value;
}

const STATUS_RANK: Record<number, number> = {
  [ValueStatus.Usual]: 0,
  [ValueStatus.Occasional]: 1,
  [ValueStatus.Rare]: 2,
  [ValueStatus.Unknown]: 3,
  [ValueStatus.NotCoded]: 4,
  [ValueStatus.Inapplicable]: 5,
};

function setReason(compiled: CompiledMatrix, observation: PreparedObservation & { kind: 'set' }, t: number): Reason {
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
  const seen = observedText(observation);
  const cell = effectiveCellOf(compiled, trait, t);
  let status: ReasonStatus;
  let text: string;
  switch (best) {
    case ValueStatus.Usual:
      status = 'matched';
      text = reasonTexts.matched(trait, seen);
      break;
    case ValueStatus.Occasional:
    case ValueStatus.Rare:
      status = 'partial';
      text = reasonTexts.partial(trait, seen, codedText(trait, cell));
      break;
    case ValueStatus.Unknown:
      status = 'not-coded';
      text = reasonTexts.notCoded(trait);
      break;
    case ValueStatus.NotCoded:
      status = 'conflict';
      text = reasonTexts.conflict(trait, seen, codedText(trait, cell));
      break;
    default:
      status = 'conflict';
      text = reasonTexts.doesNotApply(trait);
  }
  return { trait: trait.code, status, likelihood, text };
}

function measureReason(compiled: CompiledMatrix, observation: PreparedObservation & { kind: 'measure' }, t: number): Reason {
  const trait = observation.trait;
  const region = measureRegion(compiled, observation, t);
  const likelihood = regionLikelihood(region, trait.errorRate);
  const seen = observedText(observation);
  if (region === 'unknown') return { trait: trait.code, status: 'not-coded', likelihood, text: reasonTexts.notCoded(trait) };
  if (region === 'inapplicable') return { trait: trait.code, status: 'conflict', likelihood, text: reasonTexts.doesNotApply(trait) };
  // the three remaining regions only arise for a coded range
  const range = rangeOf(compiled, trait, t);
  if (region === 'typical') return { trait: trait.code, status: 'matched', likelihood, text: reasonTexts.typical(trait, seen, range.low, range.high) };
  if (region === 'extreme') return { trait: trait.code, status: 'partial', likelihood, text: reasonTexts.extreme(trait, seen, range) };
  return { trait: trait.code, status: 'conflict', likelihood, text: reasonTexts.outside(trait, seen, range.min, range.max) };
}

/** Reasons of set observations depend only on the cell's pattern, so one ranking builds each once. */
export type ReasonCache = Map<number, Map<number, Reason>>;

/** Per-observation reasons for one taxon, in the order the observations were given. */
export function reasonsFor(compiled: CompiledMatrix, prepared: readonly PreparedObservation[], skipped: ReadonlyMap<number, SkipCause>, t: number, cache: ReasonCache = new Map()): Reason[] {
  return prepared.map((observation) => {
    const cause = skipped.get(observation.index);
    if (cause) return { trait: observation.trait.code, status: 'not-applicable', likelihood: 1, text: reasonTexts.skipped(compiled, observation.trait, cause) };
    if (observation.kind === 'measure') return measureReason(compiled, observation, t);
    let byPattern = cache.get(observation.index);
    if (!byPattern) {
      byPattern = new Map();
      cache.set(observation.index, byPattern);
    }
    const pattern = compiled.cellPattern[observation.trait.index * compiled.taxonCount + t];
    let reason = byPattern.get(pattern);
    if (!reason) {
      // frozen, so taxa with the same coding can share one reason object safely
      reason = Object.freeze(setReason(compiled, observation, t));
      byPattern.set(pattern, reason);
    }
    return reason;
  });
}

/** True when taxon a ranks before taxon b. */
function before(scored: Scored, a: number, b: number): boolean {
  const pa = scored.logPosterior[a];
  const pb = scored.logPosterior[b];
  if (pa !== pb) return pa > pb;
  const ca = scored.conflicts[a];
  const cb = scored.conflicts[b];
  if (ca !== cb) return ca < cb;
  return a < b;
}

/** above this limit a full sort beats keeping a sorted short list */
const INSERTION_LIMIT = 64;

/** The best `limit` taxa offered, best first; most offers are turned away by one comparison. */
class BestList {
  readonly items: number[] = [];
  total = 0;
  private worst = -Infinity;
  constructor(
    private readonly scored: Scored,
    private readonly limit: number,
  ) {}

  offer(t: number): void {
    this.total++;
    const items = this.items;
    if (this.limit > INSERTION_LIMIT) {
      items.push(t);
      return;
    }
    if (items.length === this.limit && (this.limit === 0 || this.scored.logPosterior[t] < this.worst)) return;
    if (items.length === this.limit && !before(this.scored, t, items[items.length - 1])) return;
    let at = items.length;
    while (at > 0 && before(this.scored, t, items[at - 1])) at--;
    items.splice(at, 0, t);
    if (items.length > this.limit) items.pop();
    this.worst = this.scored.logPosterior[items[items.length - 1]];
  }

  best(): number[] {
    if (this.limit <= INSERTION_LIMIT) return this.items;
    return this.items.sort((a, b) => (before(this.scored, a, b) ? -1 : before(this.scored, b, a) ? 1 : 0)).slice(0, this.limit);
  }
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
  let lists: { kept: BestList; dropped: BestList } | undefined;
  // the scored arrays are this matrix's scratch: everything needed from them is read before returning
  const scored = scoreObservations(compiled, prepared, options.priors, false, (t, partial) => {
    lists ??= { kept: new BestList(partial, limit), dropped: new BestList(partial, limit) };
    if (partial.conflicts[t] <= leeway) lists.kept.offer(t);
    else lists.dropped.offer(t);
  }, scoringScratch(compiled));
  const kept = lists?.kept ?? new BestList(scored, limit);
  const dropped = lists?.dropped ?? new BestList(scored, limit);
  const skipped = [...scored.skipped.entries()].map(([index, cause]) => {
    const observation = prepared.find((item) => item.index === index)!;
    return { trait: observation.trait.code, reason: reasonTexts.skipped(compiled, observation.trait, cause) };
  });
  const cache: ReasonCache = new Map();
  return {
    candidates: kept.best().map((t) => toCandidate(compiled, scored, prepared, t, cache)),
    ruledOut: dropped.best().map((t) => toCandidate(compiled, scored, prepared, t, cache)),
    skipped,
    totalCandidates: kept.total,
    totalRuledOut: dropped.total,
  };
}
