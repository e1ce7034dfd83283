/**
 * The answer to one identify call, computed from a compiled edition and serialised to UTF-8 JSON.
 * Pure and free of database, HTTP and Express imports, so the same code runs on the request thread
 * and in an identify worker (see identify-pool.ts).
 */
import {
  rank,
  suggest,
  validateObservations,
  type Candidate,
  type CompiledMatrix,
  type InHand,
  type Observation,
  type ObservationProblem,
  type ObservingSeason,
  type Reason,
  type Suggestion,
  type Taxon,
} from '@shared/engine';
import { taxonReference } from '../taxa/taxon-views';

export interface IdentifyRequest {
  observations: Observation[];
  season?: ObservingSeason;
  leeway?: number;
  limit?: number;
  /** what the observer has in hand; Look at next asks only about parts it shows */
  inHand?: InHand;
  /** the month of the sift (1–12); seasonal parts count as less likely to be seen outside their months */
  month?: number;
}

export interface CandidateView {
  taxon: { id: string; scientificName: string; commonNames: string[] };
  probability: number;
  conflicts: number;
  reasons: Reason[];
}

export interface EditionReference {
  id: number;
  publishedAt: string;
}

export interface IdentifyAnswer {
  edition: EditionReference;
  season: ObservingSeason;
  leeway: number;
  candidates: CandidateView[];
  ruledOut: CandidateView[];
  totalCandidates: number;
  totalRuledOut: number;
  skipped: Array<{ trait: string; reason: string }>;
  /** Look at next: the unobserved traits that would narrow the Shortlist most per unit of effort */
  suggestions: SuggestionView[];
}

/** One Look at next entry as openapi.yaml documents it (`Suggestion`). */
export interface SuggestionView {
  trait: string;
  label: string;
  expectedGain: number;
  score: number;
  /** present only when the engine looked ahead; those suggestions come first, least effort first */
  expectedEffort?: number;
  preview: Suggestion['preview'];
}

export const IDENTIFY_DEFAULTS = Object.freeze({
  season: 'leaf-on' as ObservingSeason,
  leeway: 2,
  limit: 10,
  suggestions: 5,
  inHand: 'standing-tree' as InHand,
});

/** What identify needs of an edition. */
export interface IdentifyEdition {
  compiled: CompiledMatrix;
  taxaById: ReadonlyMap<string, Taxon>;
  reference: EditionReference;
}

/** The answer as UTF-8 JSON, or the observation problems that make the request invalid. */
export type IdentifyOutcome = { kind: 'answer'; body: Uint8Array } | { kind: 'invalid'; problems: ObservationProblem[] };

const utf8 = new TextEncoder();

function candidateView(edition: IdentifyEdition, candidate: Candidate): CandidateView {
  const taxon = edition.taxaById.get(candidate.taxonId);
  return {
    taxon: taxon ? taxonReference(taxon) : { id: candidate.taxonId, scientificName: candidate.taxonId, commonNames: [] },
    probability: candidate.probability,
    conflicts: candidate.conflicts,
    reasons: candidate.reasons,
  };
}

/** The engine's suggestion reduced to the documented fields, in the engine's order. */
function suggestionView(suggestion: Suggestion): SuggestionView {
  return {
    trait: suggestion.trait,
    label: suggestion.label,
    expectedGain: suggestion.expectedGain,
    score: suggestion.score,
    ...(suggestion.expectedEffort !== undefined && { expectedEffort: suggestion.expectedEffort }),
    preview: suggestion.preview.map(({ answer, label, probability, leaders, remaining }) => ({ answer, label, probability, leaders, remaining })),
  };
}

/**
 * Counts are numbers in JSON (`"values": [3]`): a count sent as text (`"3"`) is refused rather than
 * read as the number it spells, so a client that mixes up its types hears about it.
 */
function countsGivenAsText(compiled: CompiledMatrix, observations: readonly Observation[]): ObservationProblem[] {
  const found: ObservationProblem[] = [];
  observations.forEach((observation, index) => {
    const traitIndex = compiled.traitIndexByCode.get(observation.trait);
    const trait = traitIndex === undefined ? undefined : compiled.traits[traitIndex];
    if (trait?.kind !== 'count') return;
    const values: readonly unknown[] = 'values' in observation && Array.isArray(observation.values) ? observation.values : [];
    const texts = values.filter((value): value is string => typeof value === 'string');
    if (texts.length === 0) return;
    found.push({
      index,
      field: 'values',
      code: 'count-as-text',
      message: `${trait.code} is a count: send whole numbers, not text (${texts.map((text) => `${JSON.stringify(text)} → ${Number.isFinite(Number(text)) ? Number(text) : 'a number'}`).join(', ')}).`,
    });
  });
  return found;
}

/** A sift against one edition: the Shortlist, what was Ruled out and why, and what to Look at next. */
export function identifyAnswer(edition: IdentifyEdition, request: IdentifyRequest): IdentifyOutcome {
  const compiled = edition.compiled;
  const found = [...countsGivenAsText(compiled, request.observations), ...validateObservations(compiled, request.observations)];
  if (found.length > 0) return { kind: 'invalid', problems: found };

  const season = request.season ?? IDENTIFY_DEFAULTS.season;
  const leeway = request.leeway ?? IDENTIFY_DEFAULTS.leeway;
  const limit = request.limit ?? IDENTIFY_DEFAULTS.limit;
  const ranked = rank(compiled, request.observations, { season, leeway, limit });
  const suggestions = suggest(compiled, request.observations, {
    season,
    leeway,
    limit: IDENTIFY_DEFAULTS.suggestions,
    inHand: request.inHand ?? IDENTIFY_DEFAULTS.inHand,
    ...(request.month !== undefined && { month: request.month }),
  });
  const answer: IdentifyAnswer = {
    edition: edition.reference,
    season,
    leeway,
    candidates: ranked.candidates.map((candidate) => candidateView(edition, candidate)),
    ruledOut: ranked.ruledOut.map((candidate) => candidateView(edition, candidate)),
    totalCandidates: ranked.totalCandidates ?? ranked.candidates.length,
    totalRuledOut: ranked.totalRuledOut ?? ranked.ruledOut.length,
    skipped: ranked.skipped ?? [],
    suggestions: suggestions.map(suggestionView),
  };
  return { kind: 'answer', body: utf8.encode(JSON.stringify(answer)) };
}
