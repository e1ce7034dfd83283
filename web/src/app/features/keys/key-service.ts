import { Injectable, inject } from '@angular/core';
import { HttpClient } from '@angular/common/http';
import { type Observable, map } from 'rxjs';

export type KeyScope = 'lookup' | 'identify';
export const KEY_SCOPES: readonly KeyScope[] = ['lookup', 'identify'];

export interface DayCount {
  day: string;
  count: number;
}

/** A partner key as `GET /api/v1/keys` lists it (never the secret). */
export interface PartnerKey {
  id: number;
  ownerId: number;
  name: string;
  prefix: string;
  scopes: KeyScope[];
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
  usage: { today: number; days: DayCount[] };
}

/** The answer to creating a key: the secret is in `key`, this once. */
export interface CreatedKey extends Omit<PartnerKey, 'usage'> {
  key: string;
}

/** One key's last 30 UTC days and what its daily quota has left. */
export interface KeyUsage {
  keyId: number;
  days: DayCount[];
  total: number;
  quota: { limit: number; remaining: number; resetsAt: string | null };
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null;
}

function readKeys(body: unknown): PartnerKey[] {
  if (!isRecord(body) || !Array.isArray(body['keys'])) throw new Error('The server answered with an unexpected list of keys.');
  return body['keys'] as PartnerKey[];
}

function readCreated(body: unknown): CreatedKey {
  if (!isRecord(body) || typeof body['key'] !== 'string' || typeof body['id'] !== 'number') throw new Error('The server did not return the new key.');
  return body as unknown as CreatedKey;
}

function readUsage(body: unknown): KeyUsage {
  if (!isRecord(body) || !Array.isArray(body['days']) || !isRecord(body['quota'])) throw new Error('The server answered with unexpected usage.');
  return body as unknown as KeyUsage;
}

/** The signed-in user's partner keys. */
@Injectable({ providedIn: 'root' })
export class KeyService {
  readonly #http = inject(HttpClient);

  listOwn(): Observable<PartnerKey[]> {
    return this.#http.get<unknown>('/api/v1/keys').pipe(map(readKeys));
  }

  create(name: string, scopes: KeyScope[]): Observable<CreatedKey> {
    return this.#http.post<unknown>('/api/v1/keys', { name, scopes }).pipe(map(readCreated));
  }

  usage(id: number): Observable<KeyUsage> {
    return this.#http.get<unknown>(`/api/v1/keys/${id}/usage`).pipe(map(readUsage));
  }

  revoke(id: number): Observable<void> {
    return this.#http.delete(`/api/v1/keys/${id}`).pipe(map(() => undefined));
  }
}
