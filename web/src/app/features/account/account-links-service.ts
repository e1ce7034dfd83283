import { Injectable, inject } from '@angular/core';
import { HttpClient } from '@angular/common/http';
import { type Observable, map } from 'rxjs';
import { ApiProblem } from '../../core/http/api-problem';

export interface NewPasswordRequest {
  password: string;
}

export interface AcceptInvitationRequest {
  displayName: string;
  password: string;
}

/** The account an accepted invitation created, as far as the pages need it. */
export interface InvitedAccount {
  email: string;
  /** the session the server opened for the new account, as it answered */
  session: unknown;
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null;
}

function readInvitedAccount(body: unknown): InvitedAccount {
  const account = isRecord(body) ? body['account'] : undefined;
  if (!isRecord(account) || typeof account['email'] !== 'string' || account['email'] === '') {
    throw new Error('The server answered with an unexpected account.');
  }
  return { email: account['email'], session: body };
}

/** True when the API refused a reset or invitation link as unknown, used or expired. */
export function isLinkNotValid(error: unknown): boolean {
  return error instanceof ApiProblem && error.type.endsWith('/link-not-valid');
}

/** The requests behind e-mailed links: asking for a reset, using a reset link, accepting an invitation. */
@Injectable({ providedIn: 'root' })
export class AccountLinksService {
  readonly #http = inject(HttpClient);

  /** Always accepted when the address is well formed, whether or not an account has it. */
  requestPasswordReset(email: string): Observable<void> {
    return this.#http.post<unknown>('/api/v1/password-resets', { email }).pipe(map(() => undefined));
  }

  resetPassword(token: string, request: NewPasswordRequest): Observable<void> {
    return this.#http.post<unknown>(`/api/v1/password-resets/${encodeURIComponent(token)}`, request).pipe(map(() => undefined));
  }

  acceptInvitation(token: string, request: AcceptInvitationRequest): Observable<InvitedAccount> {
    return this.#http.post<unknown>(`/api/v1/invitations/${encodeURIComponent(token)}`, request).pipe(map(readInvitedAccount));
  }
}
