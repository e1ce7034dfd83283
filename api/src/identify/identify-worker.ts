/**
 * An identify worker thread (run by the pool in identify-pool.ts). It keeps the editions it has
 * been sent, compiled, and answers identify tasks with the answer's UTF-8 JSON (moved, not copied,
 * back to the request thread), so the ranking, the suggestions and the serialising all happen off
 * the request thread.
 *
 * Protocol: a task names its edition by `key`. A worker that does not hold that edition answers
 * `needs-edition`, and the pool sends the task again with the edition's document attached.
 */
import { move } from 'piscina';
import { compileMatrix, type MatrixDocument, type Taxon } from '@shared/engine';
import { identifyAnswer, type EditionReference, type IdentifyEdition, type IdentifyOutcome, type IdentifyRequest } from './identify-answer';

export interface IdentifyTask {
  edition: {
    /** unique per loaded edition in the parent process */
    key: number;
    reference: EditionReference;
    /** sent only after this worker answered `needs-edition` */
    document?: MatrixDocument;
  };
  request: IdentifyRequest;
}

/** the answer's bytes, or why there is none */
export type IdentifyReply = Uint8Array | Exclude<IdentifyOutcome, { kind: 'answer' }> | { kind: 'needs-edition' };

/** editions a worker keeps compiled; the current one and the one before it cover a publish in flight */
const KEPT_EDITIONS = 2;
const editions = new Map<number, IdentifyEdition>();

function editionFor(task: IdentifyTask): IdentifyEdition | undefined {
  const { key, reference, document } = task.edition;
  let edition = editions.get(key);
  if (edition) {
    // most recently used last, so the oldest is the one let go
    editions.delete(key);
  } else if (document) {
    edition = { compiled: compileMatrix(document), taxaById: new Map<string, Taxon>(document.taxa.map((taxon) => [taxon.id, taxon])), reference };
  } else {
    return undefined;
  }
  editions.set(key, edition);
  while (editions.size > KEPT_EDITIONS) editions.delete(editions.keys().next().value as number);
  return edition;
}

export default function identifyInWorker(task: IdentifyTask): IdentifyReply {
  const edition = editionFor(task);
  if (!edition) return { kind: 'needs-edition' };
  const outcome = identifyAnswer(edition, task.request);
  return outcome.kind === 'answer' ? (move(outcome.body) as Uint8Array) : outcome;
}
