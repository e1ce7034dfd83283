import { rank, suggest, validateObservations, type Candidate, type Observation, type ObservationProblem, type ObservingSeason, type Reason, type Suggestion } from '@shared/engine';
import type { EditionCatalog, LoadedEdition } from '../editions/edition-catalog';
import { problems, type InvalidParam } from '../http/problem';
import { taxonReference } from '../taxa/taxon-views';

export interface IdentifyRequest {
  observations: Observation[];
  season?: ObservingSeason;
  leeway?: number;
  limit?: number;
}

export interface CandidateView {
  taxon: { id: string; scientificName: string; commonNames: string[] };
  probability: number;
  conflicts: number;
  reasons: Reason[];
}

export interface IdentifyAnswer {
  edition: { id: number; publishedAt: string };
  season: ObservingSeason;
  leeway: number;
  candidates: CandidateView[];
  ruledOut: CandidateView[];
  totalCandidates: number;
  totalRuledOut: number;
  skipped: Array<{ trait: string; reason: string }>;
  /** Look at next: the unobserved traits that would narrow the Shortlist most per unit of effort */
  suggestions: Suggestion[];
}

export const IDENTIFY_DEFAULTS = Object.freeze({ season: 'leaf-on' as ObservingSeason, leeway: 2, limit: 10, suggestions: 5 });

/** Where an observation problem sits, as a JSON pointer into the request (the validator's own form: `/body/...`). */
function pointerOf(problem: ObservationProblem): string {
  const base = `/body/observations/${problem.index}`;
  return problem.field === 'observation' ? base : `${base}/${problem.field}`;
}

function rejectInvalid(found: ObservationProblem[]): never {
  const invalid: InvalidParam[] = found.map((problem) => ({ name: pointerOf(problem), reason: problem.message }));
  const more = found.length > 1 ? ` (and ${found.length - 1} more problem${found.length > 2 ? 's' : ''})` : '';
  throw problems.invalidInput(`${found[0]?.message ?? 'The observations are not valid.'}${more}`, invalid);
}

function candidateView(edition: LoadedEdition, candidate: Candidate): CandidateView {
  const taxon = edition.taxaById.get(candidate.taxonId);
  return {
    taxon: taxon ? taxonReference(taxon) : { id: candidate.taxonId, scientificName: candidate.taxonId, commonNames: [] },
    probability: candidate.probability,
    conflicts: candidate.conflicts,
    reasons: candidate.reasons,
  };
}

/** A sift against the current edition: the Shortlist, what was Ruled out and why, and what to Look at next. */
export async function identify(editions: EditionCatalog, request: IdentifyRequest): Promise<IdentifyAnswer> {
  const edition = await editions.current();
  const compiled = edition.compiled;
  const found = validateObservations(compiled, request.observations);
  if (found.length > 0) rejectInvalid(found);

  const season = request.season ?? IDENTIFY_DEFAULTS.season;
  const leeway = request.leeway ?? IDENTIFY_DEFAULTS.leeway;
  const limit = request.limit ?? IDENTIFY_DEFAULTS.limit;
  const ranked = rank(compiled, request.observations, { season, leeway, limit });
  const suggestions = suggest(compiled, request.observations, { season, leeway, limit: IDENTIFY_DEFAULTS.suggestions });
  return {
    edition: edition.reference,
    season,
    leeway,
    candidates: ranked.candidates.map((candidate) => candidateView(edition, candidate)),
    ruledOut: ranked.ruledOut.map((candidate) => candidateView(edition, candidate)),
    totalCandidates: ranked.totalCandidates ?? ranked.candidates.length,
    totalRuledOut: ranked.totalRuledOut ?? ranked.ruledOut.length,
    skipped: ranked.skipped ?? [],
    suggestions,
  };
}
