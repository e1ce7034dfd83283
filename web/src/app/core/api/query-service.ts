import { Injectable, inject } from '@angular/core';
import { HttpClient, HttpParams } from '@angular/common/http';
import { type Observable, catchError, map, throwError } from 'rxjs';
import type { Cell } from '@shared/engine';
import { ApiProblem } from '../http/api-problem';

export type QueryState = 'open' | 'answered' | 'settled';
export const QUERY_STATES: readonly QueryState[] = ['open', 'answered', 'settled'];

/** One step of a query's history. */
export interface QueryEvent {
  action: 'raised' | 'answered' | 'settled' | 'recoded';
  actorId: number;
  actorName: string;
  note: string | null;
  at: string;
}

/** A value flagged as doubtful: one cell (taxon × trait), the raiser's note, and what reviewers did. */
export interface CellQuery {
  id: number;
  taxonId: string;
  traitCode: string;
  note: string;
  state: QueryState;
  raisedBy: number;
  answer: string | null;
  evidence: string | null;
  answeredBy: number | null;
  outcome: 'kept' | 'recoded' | null;
  settledBy: number | null;
  settledAt: string | null;
  createdAt: string;
  updatedAt: string;
  history: QueryEvent[];
}

export interface QueryFilter {
  state?: QueryState;
  taxonId?: string;
  traitCode?: string;
}

/** One working-matrix cell and the version it is at (0: never written). */
export interface CellVersion {
  value: Cell;
  version: number;
}

/** What a reviewer writes into the cell when recoding, with the version they read. */
export interface CellChange extends CellVersion {
  reason: string;
}

/** A recode refused because the cell moved on since the version sent; `current` is the cell now. */
export class StaleCell extends Error {
  constructor(
    readonly current: CellVersion,
    readonly problem: ApiProblem,
  ) {
    super(problem.readable);
    this.name = 'StaleCell';
  }
}

const ACTIONS: ReadonlyArray<QueryEvent['action']> = ['raised', 'answered', 'settled', 'recoded'];

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

const stringOrNull = (value: unknown): string | null => (typeof value === 'string' ? value : null);
const numberOrNull = (value: unknown): number | null => (typeof value === 'number' ? value : null);

function readEvent(value: unknown): QueryEvent[] {
  if (!isRecord(value) || !ACTIONS.includes(value['action'] as QueryEvent['action'])) return [];
  return [
    {
      action: value['action'] as QueryEvent['action'],
      actorId: typeof value['actorId'] === 'number' ? value['actorId'] : 0,
      actorName: typeof value['actorName'] === 'string' ? value['actorName'] : 'someone',
      note: stringOrNull(value['note']),
      at: typeof value['at'] === 'string' ? value['at'] : '',
    },
  ];
}

export function readQuery(value: unknown): CellQuery {
  if (
    !isRecord(value) ||
    typeof value['id'] !== 'number' ||
    typeof value['taxonId'] !== 'string' ||
    typeof value['traitCode'] !== 'string' ||
    !QUERY_STATES.includes(value['state'] as QueryState)
  ) {
    throw new Error('The server answered with an unexpected query.');
  }
  const outcome = value['outcome'];
  return {
    id: value['id'],
    taxonId: value['taxonId'],
    traitCode: value['traitCode'],
    note: typeof value['note'] === 'string' ? value['note'] : '',
    state: value['state'] as QueryState,
    raisedBy: typeof value['raisedBy'] === 'number' ? value['raisedBy'] : 0,
    answer: stringOrNull(value['answer']),
    evidence: stringOrNull(value['evidence']),
    answeredBy: numberOrNull(value['answeredBy']),
    outcome: outcome === 'kept' || outcome === 'recoded' ? outcome : null,
    settledBy: numberOrNull(value['settledBy']),
    settledAt: stringOrNull(value['settledAt']),
    createdAt: typeof value['createdAt'] === 'string' ? value['createdAt'] : '',
    updatedAt: typeof value['updatedAt'] === 'string' ? value['updatedAt'] : '',
    history: Array.isArray(value['history']) ? value['history'].flatMap(readEvent) : [],
  };
}

function readQueryList(body: unknown): CellQuery[] {
  if (!isRecord(body) || !Array.isArray(body['queries'])) throw new Error('The server answered with an unexpected list of queries.');
  return body['queries'].map(readQuery);
}

function isCell(value: unknown): value is Cell {
  return value === 'unknown' || value === 'inapplicable' || isRecord(value);
}

function readCellVersion(value: unknown): CellVersion | null {
  if (!isRecord(value) || !isCell(value['value']) || typeof value['version'] !== 'number') return null;
  return { value: value['value'], version: value['version'] };
}

function readRecoded(body: unknown): { query: CellQuery; cell: CellVersion } {
  const cell = isRecord(body) ? readCellVersion(body['cell']) : null;
  if (!isRecord(body) || !cell) throw new Error('The server answered with an unexpected recode.');
  return { query: readQuery(body['query']), cell };
}

/**
 * Queries on doubtful cells through `/api/v1/queries`: anyone signed in raises them; reviewers and
 * admins work them in the Second look queue.
 */
@Injectable({ providedIn: 'root' })
export class QueryService {
  readonly #http = inject(HttpClient);

  /** Reviewers and admins: every query; anyone else: the ones they raised. Oldest first. */
  listQueries(filter: QueryFilter = {}): Observable<CellQuery[]> {
    let params = new HttpParams();
    for (const [key, value] of Object.entries(filter)) if (value) params = params.set(key, value as string);
    return this.#http.get<unknown>('/api/v1/queries', { params }).pipe(map(readQueryList));
  }

  getQuery(id: number): Observable<CellQuery> {
    return this.#http.get<unknown>(`/api/v1/queries/${id}`).pipe(map(readQuery));
  }

  /** Flags one cell as doubtful; the note says what the person saw. */
  raiseQuery(taxonId: string, traitCode: string, note: string): Observable<CellQuery> {
    return this.#http.post<unknown>('/api/v1/queries', { taxonId, traitCode, note }).pipe(map(readQuery));
  }

  answerQuery(id: number, answer: string, evidence: string): Observable<CellQuery> {
    const body = evidence.trim() === '' ? { answer } : { answer, evidence };
    return this.#http.post<unknown>(`/api/v1/queries/${id}/answer`, body).pipe(map(readQuery));
  }

  /** Settles an answered query, keeping the cell as it is. */
  settleQuery(id: number, note: string): Observable<CellQuery> {
    return this.#http.post<unknown>(`/api/v1/queries/${id}/settle`, note.trim() === '' ? {} : { note }).pipe(map(readQuery));
  }

  /** The queried cell in the working matrix with its version (reviewers and admins; others get 403). */
  workingCell(queryId: number): Observable<CellVersion> {
    return this.#http.get<unknown>(`/api/v1/queries/${queryId}/cell`).pipe(
      map((body) => {
        const cell = readCellVersion(body);
        if (!cell) throw new Error('The server answered with an unexpected cell.');
        return cell;
      }),
    );
  }

  /**
   * Writes the cell and settles the query as recoded. If the cell moved on since `change.version`,
   * nothing is written and the error is a StaleCell holding the cell as it is now; every other failure
   * is an ApiProblem.
   */
  recodeQuery(id: number, change: CellChange): Observable<{ query: CellQuery; cell: CellVersion }> {
    return this.#http.post<unknown>(`/api/v1/queries/${id}/recode`, change).pipe(
      map(readRecoded),
      catchError((error: unknown) => {
        const current = error instanceof ApiProblem && error.status === 409 ? readCellVersion(error.extensions['current']) : null;
        return throwError(() => (current && error instanceof ApiProblem ? new StaleCell(current, error) : error));
      }),
    );
  }
}
