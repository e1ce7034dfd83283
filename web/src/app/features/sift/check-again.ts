/**
 * Check again: the answer of a sift that the rest of it disagrees with.
 *
 * Invariant: an observation is named only when the current ranking holds a majority of its
 * probability on species that conflict with it, or when the current leader conflicts with it and
 * ranking without it gives another leader. Both are read from the engine's `rank`, run once with
 * every observation and once without each.
 */
import { rank, type Candidate, type CompiledMatrix, type Observation, type ObservingSeason } from '@shared/engine';

/** More than this share of the probability on conflicting species names the answer (common practice, no source). */
export const DISAGREEMENT_SHARE = 0.5;

export interface CheckAgain {
  observation: Observation;
  /** share of the ranking's probability on species that conflict with this answer, in [0, 1] */
  disagreeing: number;
  /** the leader with every answer, and the ranking without this one (best first) */
  leader: string;
  without: Candidate[];
}

function conflictsWith(candidate: Candidate, trait: string): boolean {
  return candidate.reasons.some((reason) => reason.trait === trait && (reason.status === 'conflict' || reason.status === 'not-applicable'));
}

/** The most doubtful answer, or null when every answer sits well with the rest. */
export function checkAgain(
  compiled: CompiledMatrix,
  observations: readonly Observation[],
  options: { season: ObservingSeason; leeway: number; limit?: number },
): CheckAgain | null {
  if (observations.length < 2) return null;
  const ranked = rank(compiled, observations, options);
  const everyone = [...ranked.candidates, ...ranked.ruledOut];
  const leader = ranked.candidates[0] ?? ranked.ruledOut[0];
  if (!leader) return null;
  let worst: CheckAgain | null = null;
  for (const observation of observations) {
    const disagreeing = everyone.filter((candidate) => conflictsWith(candidate, observation.trait)).reduce((sum, candidate) => sum + candidate.probability, 0);
    const leaderDisagrees = conflictsWith(leader, observation.trait);
    if (disagreeing <= DISAGREEMENT_SHARE && !leaderDisagrees) continue;
    const others = observations.filter((other) => other !== observation);
    const without = rank(compiled, others, options).candidates;
    const leaderChanges = (without[0]?.taxonId ?? leader.taxonId) !== leader.taxonId;
    if (disagreeing <= DISAGREEMENT_SHARE && !(leaderDisagrees && leaderChanges)) continue;
    if (!worst || disagreeing > worst.disagreeing) worst = { observation, disagreeing, leader: leader.taxonId, without };
  }
  return worst;
}
