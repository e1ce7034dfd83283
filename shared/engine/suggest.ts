/**
 * suggest: which trait to Look at next.
 *
 * Each unobserved trait is scored by the expected reduction of the entropy of the current posterior
 * (Shannon 1948) per unit of ease, weighed by the chance the trait can be seen now on what is in
 * hand (in-hand.ts); the opening question is also weighed by how seldom the trait is misread, since
 * a wrong first answer steers every later one. For a small shortlist the order is refined by one step of
 * lookahead: the expected effort of asking the trait and then following the greedy choice. This file
 * picks the candidates and orders them; answer-sums.ts weighs a trait's answers, lookahead.ts runs
 * the rollouts and preview.ts says who leads after each answer.
 * Invariant: a suggestion is never a trait already observed, excluded, out of season, of a part not
 * in hand, with no chance of being seen this month, ruled out by an observed appliesWhen condition,
 * or one expected to gain less than SUGGEST_DEFAULTS.minGainBits.
 */
import { cutsFor, discreteSums, gainFromSums, numericSums, workingSet, type AnswerSums, type Evaluated, type WorkingSet } from './answer-sums';
import type { CompiledMatrix, CompiledTrait } from './compiled-matrix';
import { SUGGEST_DEFAULTS, type SuggestOptions } from './defaults';
import { EngineUsageError, usageMessages } from './errors';
import { isInHand, isMonth, seeingChance, traitInHand, type InHand } from './in-hand';
import { lookahead } from './lookahead';
import { prepareObservations, type PreparedObservation } from './observations';
import { heaviestFirst, previewOf } from './preview';
import { resolveCount } from './rank';
import { scoreObservations } from './scoring';
import type { Observation, ObservingSeason, PlantPart, Suggestion } from './types';
import { visibleInSeason } from './vocabulary';

/** expected efforts closer than this are treated as equal */
const COST_TIE = 2e-3;

/** True when an active observation contradicts the trait's appliesWhen condition. */
function conditionContradicted(trait: CompiledTrait, active: readonly PreparedObservation[]): boolean {
  return trait.conditions.some((condition) => {
    const observed = active.find((observation) => observation.trait.index === condition.trait);
    return observed !== undefined && observed.kind === 'set' && !observed.answers.some((answer) => condition.allowed.includes(answer));
  });
}

/** Whether the trait's answers can fall differently for two members of the shortlist. */
function splitsShortlist(compiled: CompiledMatrix, trait: CompiledTrait, shortlist: WorkingSet): boolean {
  const n = compiled.taxonCount;
  const base = trait.index * n;
  const members = shortlist.members;
  if (members.length < 2) return false;
  if (trait.kind === 'numeric') {
    const block = trait.numericIndex * 4 * n;
    const first = members[0];
    for (let i = 1; i < members.length; i++) {
      const t = members[i];
      if (compiled.cellPattern[base + t] !== compiled.cellPattern[base + first]) return true;
      for (let field = 0; field < 4; field++) if (compiled.ranges[block + field * n + t] !== compiled.ranges[block + field * n + first]) return true;
    }
    return false;
  }
  const k = trait.answerCount;
  const firstRow = trait.likBase + compiled.cellPattern[base + members[0]] * k;
  for (let i = 1; i < members.length; i++) {
    const row = trait.likBase + compiled.cellPattern[base + members[i]] * k;
    if (row === firstRow) continue;
    for (let a = 0; a < k; a++) if (Math.abs(compiled.likelihood[row + a] - compiled.likelihood[firstRow + a]) > 1e-12) return true;
  }
  return false;
}

function resolveInHand(value: unknown): InHand {
  if (value === undefined) return SUGGEST_DEFAULTS.inHand;
  if (!isInHand(value))
    throw new EngineUsageError(
      usageMessages.badOption('inHand', value, 'one of standing-tree, leafy-twig, winter-twig, bark-only, cone-or-fruit, fallen-leaf'),
    );
  return value;
}

function resolveMonth(value: unknown): number | undefined {
  if (value === undefined) return undefined;
  if (!isMonth(value)) throw new EngineUsageError(usageMessages.badOption('month', value, 'a whole number from 1 to 12'));
  return value;
}

/** The opening question's weight for how seldom the trait is misread: 1 − its coded error rate. */
function reliability(trait: CompiledTrait): number {
  return 1 - Math.min(Math.max(trait.codedErrorRate, 0), 0.49);
}

function percent(x: number): string {
  return `${Math.round(x * 100)}%`;
}

/** Why a trait stands where it does, in one sentence the UI can show. */
function reasonFor(item: Evaluated, opening: boolean, seeing: string): string {
  const parts = [`expected to narrow the shortlist by ${item.gain.toFixed(2)} bits at ease ${item.trait.ease}`];
  if (seeing) parts.push(`weighed down because ${seeing}`);
  else parts.push('always at hand');
  if (opening)
    parts.push(`misread about ${percent(Math.min(Math.max(item.trait.codedErrorRate, 0), 0.49))} of the time, which counts most for a first question`);
  const sentence = parts.join('; ');
  return `${sentence.charAt(0).toUpperCase()}${sentence.slice(1)}.`;
}

function resolveSeason(season: unknown): ObservingSeason {
  return season === 'leaf-off' ? 'leaf-off' : 'leaf-on';
}

/**
 * The unobserved traits most worth looking at next, best first. Throws ObservationError for invalid
 * observations.
 */
export function suggest(compiled: CompiledMatrix, observations: readonly Observation[], options: SuggestOptions = {}): Suggestion[] {
  const season = resolveSeason(options.season ?? SUGGEST_DEFAULTS.season);
  const limit = resolveCount('limit', options.limit, SUGGEST_DEFAULTS.limit);
  // the leeway is still checked, though previews no longer count by it
  resolveCount('leeway', options.leeway, SUGGEST_DEFAULTS.leeway);
  const lookaheadMax = resolveCount('lookaheadMaxCandidates', options.lookaheadMaxCandidates, SUGGEST_DEFAULTS.lookaheadMaxCandidates);
  const confidentAt = options.confidentAt ?? SUGGEST_DEFAULTS.confidentAt;
  const inHand = resolveInHand(options.inHand);
  const month = resolveMonth(options.month);
  const prepared = prepareObservations(compiled, observations);
  const scored = scoreObservations(compiled, prepared, options.priors);
  const set = workingSet(scored, SUGGEST_DEFAULTS.negligibleProbability);
  if (set.members.length < 2 || limit === 0) return [];
  let leader = 0;
  for (const p of scored.probability) if (p > leader) leader = p;
  const shortlist = workingSet(scored, leader * SUGGEST_DEFAULTS.shortlistShare);

  const observed = new Set(prepared.map((observation) => observation.trait.index));
  const partsSeen = new Set<PlantPart>(prepared.map((observation) => observation.trait.part));
  const opening = prepared.length === 0;
  const excluded = new Set(options.exclude ?? []);
  const evaluated: Evaluated[] = [];
  const seeingReasons = new Map<Evaluated, string>();
  for (const trait of compiled.traits) {
    if (observed.has(trait.index) || excluded.has(trait.code) || !visibleInSeason(trait, season)) continue;
    const seeing =
      options.assumeSeen === true ? { chance: traitInHand(trait, inHand).inHand ? 1 : 0, reason: '' } : seeingChance(trait, inHand, month, partsSeen);
    if (seeing.chance <= 0) continue;
    if (conditionContradicted(trait, scored.active) || !splitsShortlist(compiled, trait, shortlist)) continue;
    let sums: AnswerSums;
    let cuts: number[] | undefined;
    if (trait.kind === 'numeric') {
      cuts = cutsFor(compiled, trait, set);
      if (cuts.length === 0) continue;
      sums = numericSums(compiled, trait, set, cuts);
    } else {
      if (trait.answerCount < 2) continue;
      sums = discreteSums(compiled, trait, set);
    }
    const gain = gainFromSums(sums, set.entropyNats);
    if (gain < SUGGEST_DEFAULTS.minGainBits) continue;
    const weight = seeing.chance * (opening ? reliability(trait) : 1);
    const item: Evaluated = { trait, gain, score: (gain * weight) / trait.ease, effort: trait.ease / seeing.chance, sums, ...(cuts && { cuts }) };
    evaluated.push(item);
    seeingReasons.set(item, seeing.reason);
  }
  evaluated.sort((a, b) => b.score - a.score || a.trait.index - b.trait.index);

  let costs: Map<Evaluated, number> | undefined;
  if (lookaheadMax > 0 && shortlist.members.length <= lookaheadMax && evaluated.length > 1) {
    costs = lookahead(compiled, evaluated, shortlist, confidentAt);
    const withCost = evaluated.filter((item) => costs?.has(item));
    // costs within COST_TIE of each other are ties (the error floor adds noise of that order); the better gain per ease wins
    withCost.sort((a, b) => {
      const difference = (costs?.get(a) ?? 0) - (costs?.get(b) ?? 0);
      return Math.abs(difference) > COST_TIE ? difference : b.score - a.score || a.trait.index - b.trait.index;
    });
    evaluated.splice(0, withCost.length, ...withCost);
  }

  const order = heaviestFirst(set);
  const shortlisted = new Set(shortlist.members);
  return evaluated.slice(0, limit).map((item) => {
    const effort = costs?.get(item);
    return {
      trait: item.trait.code,
      label: item.trait.label,
      expectedGain: item.gain,
      score: item.score,
      reason: reasonFor(item, opening, seeingReasons.get(item) ?? ''),
      preview: previewOf(compiled, item, set, order, shortlisted),
      ...(effort !== undefined && { expectedEffort: effort }),
    };
  });
}
