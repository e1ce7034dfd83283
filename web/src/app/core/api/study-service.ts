import { Injectable, inject } from '@angular/core';
import { HttpClient, HttpParams } from '@angular/common/http';
import { type Observable, catchError, map, of, tap, throwError } from 'rxjs';
import { ApiProblem } from '../http/api-problem';

/** One species of a study set, as `GET /api/v1/study-sets/{id}` lists it. */
export interface StudySetSpecies {
  id: string;
  scientificName: string;
  commonNames: string[];
  /** retired from the matrix since the set was made */
  retired: boolean;
}

/** A coach's species list for an event or class. */
export interface StudySet {
  id: number;
  name: string;
  event: string | null;
  eventDate: string | null;
  notes: string | null;
  shared: boolean;
  ownerId: number;
  ownerName: string;
  taxa: StudySetSpecies[];
  createdAt: string;
  updatedAt: string;
}

/** What a coach fills in; `taxa` are taxon ids in the coach's order. */
export interface StudySetDraft {
  name: string;
  event: string | null;
  eventDate: string | null;
  notes: string | null;
  shared: boolean;
  taxa: string[];
}

/** One species found by name, from `GET /api/v1/taxa?q=`. */
export interface TaxonMatch {
  id: string;
  scientificName: string;
  commonNames: string[];
  family: string;
}

/** A study set and whether it came from this device because the server could not be reached. */
export interface LoadedStudySet {
  set: StudySet;
  fromDevice: boolean;
}

const SAVED_SET_PREFIX = 'sylvasift.study-set.';

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function stringOrNull(value: unknown): string | null {
  return typeof value === 'string' ? value : null;
}

function stringList(value: unknown): string[] {
  return Array.isArray(value) ? value.filter((item): item is string => typeof item === 'string') : [];
}

function readSpecies(value: unknown): StudySetSpecies {
  if (!isRecord(value) || typeof value['id'] !== 'string' || typeof value['scientificName'] !== 'string') {
    throw new Error('The server answered with an unexpected species in a study set.');
  }
  return { id: value['id'], scientificName: value['scientificName'], commonNames: stringList(value['commonNames']), retired: value['retired'] === true };
}

export function readStudySet(value: unknown): StudySet {
  if (!isRecord(value) || typeof value['id'] !== 'number' || typeof value['name'] !== 'string' || !Array.isArray(value['taxa'])) {
    throw new Error('The server answered with an unexpected study set.');
  }
  return {
    id: value['id'],
    name: value['name'],
    event: stringOrNull(value['event']),
    eventDate: stringOrNull(value['eventDate']),
    notes: stringOrNull(value['notes']),
    shared: value['shared'] === true,
    ownerId: typeof value['ownerId'] === 'number' ? value['ownerId'] : 0,
    ownerName: typeof value['ownerName'] === 'string' ? value['ownerName'] : '',
    taxa: value['taxa'].map(readSpecies),
    createdAt: typeof value['createdAt'] === 'string' ? value['createdAt'] : '',
    updatedAt: typeof value['updatedAt'] === 'string' ? value['updatedAt'] : '',
  };
}

function readStudySetList(body: unknown): StudySet[] {
  if (!isRecord(body) || !Array.isArray(body['studySets'])) throw new Error('The server answered with an unexpected list of study sets.');
  return body['studySets'].map(readStudySet);
}

function readTaxonPage(body: unknown): TaxonMatch[] {
  if (!isRecord(body) || !Array.isArray(body['items'])) throw new Error('The server answered with an unexpected species search.');
  return body['items'].filter(isRecord).flatMap((item) =>
    typeof item['id'] === 'string' && typeof item['scientificName'] === 'string'
      ? [
          {
            id: item['id'],
            scientificName: item['scientificName'],
            commonNames: stringList(item['commonNames']),
            family: typeof item['family'] === 'string' ? item['family'] : '',
          },
        ]
      : [],
  );
}

function saveOnDevice(set: StudySet): void {
  try {
    localStorage.setItem(SAVED_SET_PREFIX + set.id, JSON.stringify(set));
  } catch {
    // storage full or private browsing: the set just will not open offline
  }
}

function savedOnDevice(id: number): StudySet | null {
  try {
    const text = localStorage.getItem(SAVED_SET_PREFIX + id);
    return text ? readStudySet(JSON.parse(text)) : null;
  } catch {
    return null;
  }
}

/** Every set this device keeps, most recently changed first. */
function allOnDevice(): StudySet[] {
  const sets: StudySet[] = [];
  try {
    for (let index = 0; index < localStorage.length; index += 1) {
      const key = localStorage.key(index);
      if (!key?.startsWith(SAVED_SET_PREFIX)) continue;
      const set = savedOnDevice(Number(key.slice(SAVED_SET_PREFIX.length)));
      if (set) sets.push(set);
    }
  } catch {
    // storage not readable: nothing kept
  }
  return sets.sort((a, b) => b.updatedAt.localeCompare(a.updatedAt) || a.name.localeCompare(b.name));
}

function forgetOnDevice(id: number): void {
  try {
    localStorage.removeItem(SAVED_SET_PREFIX + id);
  } catch {
    // nothing stored
  }
}

/**
 * Study sets through `/api/v1/study-sets`. Each set read is also kept on the device, so a set
 * opened once can be drilled without a connection.
 */
@Injectable({ providedIn: 'root' })
export class StudyService {
  readonly #http = inject(HttpClient);

  /** The caller's sets (an admin's: everyone's), most recently changed first. */
  listSets(): Observable<StudySet[]> {
    return this.#http.get<unknown>('/api/v1/study-sets').pipe(map(readStudySetList));
  }

  /** One set; with no connection, the copy this device kept the last time it was opened. */
  loadSet(id: number): Observable<LoadedStudySet> {
    return this.#http.get<unknown>(`/api/v1/study-sets/${id}`).pipe(
      map(readStudySet),
      tap(saveOnDevice),
      map((set) => ({ set, fromDevice: false })),
      catchError((error: unknown) => {
        const saved = error instanceof ApiProblem && error.offline ? savedOnDevice(id) : null;
        if (error instanceof ApiProblem && error.status === 404) forgetOnDevice(id);
        return saved ? of({ set: saved, fromDevice: true }) : throwError(() => error);
      }),
    );
  }

  /**
   * Shared sets of other people that were opened on this device (a learner's sets from their
   * coaches), as kept the last time each was opened.
   */
  sharedSetsOpenedHere(myId: number): StudySet[] {
    return allOnDevice().filter((set) => set.shared && set.ownerId !== myId);
  }

  createSet(draft: StudySetDraft): Observable<StudySet> {
    return this.#http.post<unknown>('/api/v1/study-sets', draft).pipe(map(readStudySet), tap(saveOnDevice));
  }

  /** Saves every field; the species list replaces the stored one. */
  changeSet(id: number, draft: StudySetDraft): Observable<StudySet> {
    return this.#http.patch<unknown>(`/api/v1/study-sets/${id}`, draft).pipe(map(readStudySet), tap(saveOnDevice));
  }

  deleteSet(id: number): Observable<void> {
    return this.#http.delete<unknown>(`/api/v1/study-sets/${id}`).pipe(
      map(() => undefined),
      tap(() => forgetOnDevice(id)),
    );
  }

  /** Published species whose names match the words (typos tolerated), best first. */
  searchSpecies(words: string, pageSize = 8): Observable<TaxonMatch[]> {
    const params = new HttpParams().set('q', words.slice(0, 100)).set('pageSize', pageSize);
    return this.#http.get<unknown>('/api/v1/taxa', { params }).pipe(map(readTaxonPage));
  }
}
