import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Piscina } from 'piscina';
import type { LoadedEdition } from '../editions/edition-catalog';
import { HttpProblem } from '../http/problem';
import type { IdentifyOutcome, IdentifyRequest } from './identify-answer';
import type { IdentifyReply, IdentifyTask } from './identify-worker';

/** identify calls that may wait for a free worker, per worker, before new ones are turned away with 503 */
const QUEUE_PER_WORKER = 256;
/**
 * Tasks handed to a worker at once. A worker answers them one after another, but with the next
 * one already waiting it need not sit idle for a round trip to the request thread between tasks.
 */
const TASKS_IN_HAND = 4;

/**
 * The worker module: next to this file when running from source, next to the bundle (built as a
 * second entry point) when running from dist/api.
 */
function workerFile(): string {
  for (const name of ['./identify-worker.ts', './identify-worker.js']) {
    const file = fileURLToPath(new URL(name, import.meta.url));
    if (existsSync(file)) return file;
  }
  throw new Error('identify-worker is missing next to the identify pool or the server bundle');
}

/** Worker threads load TypeScript through tsx when the process itself does not pass it on. */
export function workerExecArgv(file: string, inherited: readonly string[] = process.execArgv): string[] {
  if (!file.endsWith('.ts')) return [...inherited];
  // `--import tsx`, `--import=tsx`, or the loader file tsx itself passes on (`…/node_modules/tsx/dist/loader.mjs`)
  const hasTsx = inherited.some((arg) => /(^|[=/\\])tsx([/\\]|$)/.test(arg));
  return hasTsx ? [...inherited] : [...inherited, '--import', 'tsx'];
}

/** Every identify worker is busy and the queue is full: a 503 the route sends with Retry-After. */
export class IdentifyBusy extends HttpProblem {
  readonly retryAfterSeconds = 1;
  constructor() {
    super(503, 'busy', 'Busy', 'Identify is busy with other requests; try again in a moment.');
  }
}

function needsEdition(reply: IdentifyReply): reply is { kind: 'needs-edition' } {
  return !(reply instanceof Uint8Array) && reply.kind === 'needs-edition';
}

/**
 * Runs identify on a pool of worker threads, so that ranking, suggesting and serialising the answer
 * (most of an identify call's CPU time) run beside the request thread instead of on it. Each worker
 * compiles an edition the first time a task for it arrives.
 */
export class IdentifyPool {
  readonly #pool: Piscina<IdentifyTask, IdentifyReply>;

  /** `queuePerWorker`: identify calls that may wait per worker before the next is turned away */
  constructor(
    readonly threads: number,
    queuePerWorker = QUEUE_PER_WORKER,
  ) {
    const filename = workerFile();
    this.#pool = new Piscina({
      filename,
      execArgv: workerExecArgv(filename),
      minThreads: threads,
      maxThreads: threads,
      // the workers keep compiled editions, so they stay up for the life of the app
      idleTimeout: Infinity,
      maxQueue: threads * queuePerWorker,
      concurrentTasksPerWorker: TASKS_IN_HAND,
      // first come, first answered: without it a task the worker could not take at once goes to the back of the queue
      stricterFIFO: true,
      recordTiming: false,
    });
  }

  async identify(edition: LoadedEdition, request: IdentifyRequest): Promise<IdentifyOutcome> {
    const task: IdentifyTask = { edition: { key: edition.key, reference: edition.reference }, request };
    let reply = await this.#run(task);
    if (needsEdition(reply)) reply = await this.#run({ ...task, edition: { ...task.edition, document: edition.document } });
    if (needsEdition(reply)) throw new Error('an identify worker did not take the edition it was sent');
    return reply instanceof Uint8Array ? { kind: 'answer', body: reply } : reply;
  }

  async #run(task: IdentifyTask): Promise<IdentifyReply> {
    if (this.#pool.queueSize >= this.#pool.options.maxQueue) {
      throw new IdentifyBusy();
    }
    return this.#pool.run(task);
  }

  /** Stops the workers; identify calls still waiting are rejected. */
  async close(): Promise<void> {
    await this.#pool.destroy();
  }
}
