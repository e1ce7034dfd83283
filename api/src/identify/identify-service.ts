import type { ObservationProblem } from '@shared/engine';
import type { EditionCatalog } from '../editions/edition-catalog';
import { problems, type InvalidParam } from '../http/problem';
import { identifyAnswer, type IdentifyRequest } from './identify-answer';
import type { IdentifyPool } from './identify-pool';

export interface IdentifyDeps {
  editions: EditionCatalog;
  /** answer on worker threads; without it, on the request thread */
  pool?: IdentifyPool;
}

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

/**
 * A sift against the current edition, as the UTF-8 JSON of an IdentifyAnswer: on the identify
 * workers when there is a pool, else on this thread. Invalid observations throw a 400 problem.
 */
async function identify({ editions, pool }: IdentifyDeps, request: IdentifyRequest): Promise<Uint8Array> {
  const edition = await editions.current();
  const outcome = pool ? await pool.identify(edition, request) : identifyAnswer(edition, request);
  if (outcome.kind === 'invalid') rejectInvalid(outcome.problems);
  return outcome.body;
}

/** Sifts: rank the current edition's taxa against a set of observations. */
export function identifyService(deps: IdentifyDeps) {
  return {
    identify: identify.bind(null, deps),
  };
}

export type IdentifyService = ReturnType<typeof identifyService>;
