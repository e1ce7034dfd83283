import { Injectable, inject } from '@angular/core';
import { HttpClient, HttpParams } from '@angular/common/http';
import { type Observable, catchError, map, throwError } from 'rxjs';
import type { Cell, PlantPart, Trait } from '@shared/engine';
import { ApiProblem } from '../../core/http/api-problem';

/**
 * One taxon of the working matrix as the grid holds it: its cells packed as one JSON text in the order
 * of the matrix's traits (decoded only when its row is drawn) and each cell's version in that order.
 */
export interface DeskTaxon {
  id: string;
  scientificName: string;
  family: string;
  commonNames: string[];
  /** a JSON array of the cells, in the order of `WorkingMatrix.traits` */
  packed: string;
  /** the version of each cell in that order; 0 for a cell never written */
  versions: number[];
}

/** The whole working (unpublished) matrix, `GET /api/v1/curation/matrix?format=packed`. */
export interface WorkingMatrix {
  basedOn: number | null;
  traits: Trait[];
  taxa: DeskTaxon[];
}

export interface CellState {
  taxonId: string;
  traitCode: string;
  value: Cell;
  version: number;
}

export interface EditionSummary {
  taxaAdded: string[];
  taxaRemoved: string[];
  traitsAdded: string[];
  traitsRemoved: string[];
  cellsChanged: number;
  taxonCount: number;
  traitCount: number;
}

export interface DraftSummary {
  basedOn: number | null;
  summary: EditionSummary;
  publishable: boolean;
  errors: Array<{ code: string; path: string; message: string; taxon?: string; trait?: string }>;
  invalidCells: Array<{ taxonId: string; traitCode: string; problems: string[] }>;
  warnings: number;
}

export interface Edition {
  number: number;
  title: string;
  publishedAt: string;
  summary: EditionSummary;
}

export interface AuditEntry {
  id: number;
  actor: { userId: number | null; email: string | null };
  at: string;
  entity: string;
  entityKey: string;
  action: string;
  before: unknown;
  after: unknown;
  reason: string;
}

/** A cell write refused because the cell moved on since the version sent; `current` is the cell now. */
export class StaleCellEdit extends Error {
  constructor(
    readonly current: { value: Cell; version: number },
    readonly problem: ApiProblem,
  ) {
    super(problem.readable);
    this.name = 'StaleCellEdit';
  }
}

const PARTS: readonly PlantPart[] = ['leaf', 'needle', 'cone', 'fruit', 'flower', 'twig', 'bark', 'form'];

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function isCell(value: unknown): value is Cell {
  return value === 'unknown' || value === 'inapplicable' || isRecord(value);
}

/** Checks the shape the grid relies on (the HttpClient generic is only an assertion). */
export function readWorkingMatrix(body: unknown): WorkingMatrix {
  if (!isRecord(body) || !Array.isArray(body['traits']) || !Array.isArray(body['taxa']))
    throw new Error('The server answered with an unexpected working matrix.');
  const traits = body['traits'].filter(
    (trait): trait is Trait =>
      isRecord(trait) && typeof trait['code'] === 'string' && typeof trait['label'] === 'string' && PARTS.includes(trait['part'] as PlantPart),
  );
  if (traits.length !== body['traits'].length) throw new Error('The server answered with a trait the Matrix desk cannot show.');
  const taxa: DeskTaxon[] = [];
  for (const taxon of body['taxa']) {
    if (!isRecord(taxon) || typeof taxon['id'] !== 'string' || typeof taxon['scientificName'] !== 'string' || typeof taxon['packed'] !== 'string') continue;
    taxa.push({
      id: taxon['id'],
      scientificName: taxon['scientificName'],
      family: typeof taxon['family'] === 'string' ? taxon['family'] : '',
      commonNames: Array.isArray(taxon['commonNames']) ? (taxon['commonNames'] as string[]) : [],
      packed: taxon['packed'],
      versions: Array.isArray(taxon['versions']) ? (taxon['versions'] as number[]) : [],
    });
  }
  return { basedOn: typeof body['basedOn'] === 'number' ? body['basedOn'] : null, traits, taxa };
}

/** A packed row's cells; a row that does not decode reads as unknown throughout. */
export function unpackCells(taxon: DeskTaxon, traitCount: number): Cell[] {
  try {
    const cells: unknown = JSON.parse(taxon.packed);
    if (Array.isArray(cells) && cells.length === traitCount) return cells.map((cell) => (isCell(cell) ? cell : 'unknown'));
  } catch {
    // fall through: shown as not coded rather than breaking the grid
  }
  return Array.from({ length: traitCount }, () => 'unknown' as const);
}

function readCellState(body: unknown): CellState {
  if (!isRecord(body) || !isCell(body['value']) || typeof body['version'] !== 'number') throw new Error('The server answered with an unexpected cell.');
  return { taxonId: String(body['taxonId']), traitCode: String(body['traitCode']), value: body['value'], version: body['version'] };
}

function readCurrent(problem: ApiProblem): { value: Cell; version: number } | null {
  const current = problem.extensions['current'];
  return isRecord(current) && isCell(current['value']) && typeof current['version'] === 'number'
    ? { value: current['value'], version: current['version'] }
    : null;
}

/** The Matrix desk's calls: the working matrix, cells, the draft, editions and the change log. */
@Injectable({ providedIn: 'root' })
export class DeskService {
  readonly #http = inject(HttpClient);

  /**
   * The working matrix, packed. Read as text and parsed here so the page can mark when the data
   * arrived (`desk:received`, a User Timing mark the desk benchmark reads).
   */
  workingMatrix(): Observable<WorkingMatrix> {
    return this.#http.get('/api/v1/curation/matrix', { params: { format: 'packed' }, responseType: 'text' }).pipe(
      map((text) => {
        performance.mark('desk:received');
        return readWorkingMatrix(JSON.parse(text));
      }),
    );
  }

  cell(taxonId: string, traitCode: string): Observable<CellState> {
    return this.#http.get<unknown>(`/api/v1/curation/cells/${encodeURIComponent(taxonId)}/${encodeURIComponent(traitCode)}`).pipe(map(readCellState));
  }

  /**
   * Writes one cell at the version the curator read. When the cell moved on meanwhile nothing is
   * written and the error is a StaleCellEdit holding the cell as it is now; every other failure is an ApiProblem.
   */
  setCell(taxonId: string, traitCode: string, change: { value: Cell; version: number; reason: string }): Observable<CellState> {
    return this.#http.put<unknown>(`/api/v1/curation/cells/${encodeURIComponent(taxonId)}/${encodeURIComponent(traitCode)}`, change).pipe(
      map(readCellState),
      catchError((error: unknown) => {
        const current = error instanceof ApiProblem && error.status === 409 ? readCurrent(error) : null;
        return throwError(() => (current && error instanceof ApiProblem ? new StaleCellEdit(current, error) : error));
      }),
    );
  }

  draftSummary(): Observable<DraftSummary> {
    return this.#http.get<unknown>('/api/v1/curation/draft/summary').pipe(
      map((body) => {
        if (!isRecord(body) || !isRecord(body['summary']) || typeof body['publishable'] !== 'boolean')
          throw new Error('The server answered with an unexpected draft summary.');
        const draft = body as unknown as DraftSummary;
        return { ...draft, invalidCells: Array.isArray(draft.invalidCells) ? draft.invalidCells : [], errors: Array.isArray(draft.errors) ? draft.errors : [] };
      }),
    );
  }

  editions(): Observable<{ current: number | null; editions: Edition[] }> {
    return this.#http.get<unknown>('/api/v1/editions').pipe(
      map((body) => {
        if (!isRecord(body) || !Array.isArray(body['editions'])) throw new Error('The server answered with an unexpected list of editions.');
        return { current: typeof body['current'] === 'number' ? body['current'] : null, editions: body['editions'] as Edition[] };
      }),
    );
  }

  publish(title: string, reason: string): Observable<Edition> {
    return this.#http.post<Edition>('/api/v1/editions', { title, reason });
  }

  /** One page of the audit log, newest first; `before` is the previous page's `next`. */
  audit(filter: { entity?: string; before?: number; limit: number }): Observable<{ entries: AuditEntry[]; next: number | null }> {
    let params = new HttpParams().set('limit', filter.limit);
    if (filter.entity) params = params.set('entity', filter.entity);
    if (filter.before !== undefined) params = params.set('before', filter.before);
    return this.#http.get<unknown>('/api/v1/curation/audit', { params }).pipe(
      map((body) => {
        if (!isRecord(body) || !Array.isArray(body['entries'])) throw new Error('The server answered with an unexpected audit page.');
        return { entries: body['entries'] as AuditEntry[], next: typeof body['next'] === 'number' ? body['next'] : null };
      }),
    );
  }
}
