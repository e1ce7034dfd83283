import { Injectable, inject } from '@angular/core';
import { HttpClient, HttpParams } from '@angular/common/http';
import { type Observable, map } from 'rxjs';
import type { PartnerKey } from '../keys/key-service';

export const ROLES = ['learner', 'coach', 'curator', 'reviewer', 'admin'] as const;
export type Role = (typeof ROLES)[number];

/** A user as the admin routes answer (`Account` in openapi.yaml). */
export interface Person {
  id: number;
  email: string;
  displayName: string;
  role: Role;
  active: boolean;
  createdAt: string;
  lastSignInAt: string | null;
}

export interface SentInvitation {
  email: string;
  role: Role;
  expiresAt: string;
}

export interface Backup {
  name: string;
  bytes: number;
  createdAt: string;
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null;
}

function listOf<T>(member: string, what: string) {
  return (body: unknown): T[] => {
    if (!isRecord(body) || !Array.isArray(body[member])) throw new Error(`The server answered with an unexpected list of ${what}.`);
    return body[member] as T[];
  };
}

function readPerson(body: unknown): Person {
  if (!isRecord(body) || typeof body['id'] !== 'number' || typeof body['role'] !== 'string') throw new Error('The server answered with an unexpected account.');
  return body as unknown as Person;
}

/** People, every partner key and backups, for admins. */
@Injectable({ providedIn: 'root' })
export class AdminService {
  readonly #http = inject(HttpClient);

  people(filter: { role?: Role; active?: boolean } = {}): Observable<Person[]> {
    let params = new HttpParams();
    if (filter.role) params = params.set('role', filter.role);
    if (filter.active !== undefined) params = params.set('active', String(filter.active));
    return this.#http.get<unknown>('/api/v1/admin/users', { params }).pipe(map(listOf<Person>('users', 'people')));
  }

  changePerson(id: number, change: { role?: Role; active?: boolean }): Observable<Person> {
    return this.#http.patch<unknown>(`/api/v1/admin/users/${id}`, change).pipe(map(readPerson));
  }

  invite(email: string, role: Role): Observable<SentInvitation> {
    return this.#http.post<SentInvitation>('/api/v1/admin/invitations', { email, role });
  }

  allKeys(): Observable<PartnerKey[]> {
    return this.#http.get<unknown>('/api/v1/admin/keys').pipe(map(listOf<PartnerKey>('keys', 'keys')));
  }

  revokeKey(id: number): Observable<void> {
    return this.#http.delete(`/api/v1/admin/keys/${id}`).pipe(map(() => undefined));
  }

  backups(): Observable<Backup[]> {
    return this.#http.get<unknown>('/api/v1/admin/backups').pipe(map(listOf<Backup>('backups', 'backups')));
  }

  createBackup(): Observable<Backup> {
    return this.#http.post<Backup>('/api/v1/admin/backups', null);
  }

  /** The backup file; fetched with the session's token, which a plain link would not carry. */
  downloadBackup(name: string): Observable<Blob> {
    return this.#http.get(`/api/v1/admin/backups/${encodeURIComponent(name)}`, { responseType: 'blob' });
  }

  restoreBackup(name: string): Observable<void> {
    return this.#http.post(`/api/v1/admin/backups/${encodeURIComponent(name)}/restore`, null).pipe(map(() => undefined));
  }
}
