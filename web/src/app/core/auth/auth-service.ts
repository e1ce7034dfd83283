import { Injectable, computed, inject, signal } from '@angular/core';
import { HttpClient } from '@angular/common/http';
import { type Observable, map, switchMap, tap } from 'rxjs';

/** Who is signed in, as `GET /api/v1/me` answers. */
export interface Me {
  id: string;
  email: string;
  displayName: string;
  role: string;
  createdAt?: string;
}

export interface SignUpRequest {
  email: string;
  password: string;
  displayName: string;
}

export interface SignInRequest {
  email: string;
  password: string;
}

const TOKEN_KEY = 'sylvasift.session';
/** the account last read with the session, so the app knows who is signed in while offline */
const ME_KEY = 'sylvasift.me';

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null;
}

function readMe(body: unknown): Me {
  if (!isRecord(body) || typeof body['email'] !== 'string' || typeof body['role'] !== 'string') {
    throw new Error('The server answered with an unexpected account.');
  }
  return {
    id: String(body['id'] ?? ''),
    email: body['email'],
    displayName: typeof body['displayName'] === 'string' ? body['displayName'] : body['email'],
    role: body['role'],
    createdAt: typeof body['createdAt'] === 'string' ? body['createdAt'] : undefined,
  };
}

function readToken(body: unknown): string {
  if (!isRecord(body) || typeof body['token'] !== 'string' || body['token'] === '') {
    throw new Error('The server did not return a session.');
  }
  return body['token'];
}

function storedMe(): Me | null {
  try {
    const text = localStorage.getItem(ME_KEY);
    return text && localStorage.getItem(TOKEN_KEY) ? readMe(JSON.parse(text)) : null;
  } catch {
    return null;
  }
}

function storedToken(): string | null {
  try {
    return localStorage.getItem(TOKEN_KEY);
  } catch {
    return null;
  }
}

/** The session: a bearer token kept in localStorage and the account it belongs to. */
@Injectable({ providedIn: 'root' })
export class AuthService {
  readonly #http = inject(HttpClient);
  readonly #token = signal<string | null>(storedToken());
  readonly #me = signal<Me | null>(storedMe());

  readonly token = this.#token.asReadonly();
  readonly me = this.#me.asReadonly();
  readonly signedIn = computed(() => this.#token() !== null);

  constructor() {
    // A stored session is checked once this service exists: the request passes through the auth
    // interceptor, which injects this service, so it cannot start while the constructor runs. Only
    // a 401 ends the session (refreshMe forgets it then); being offline or a server error keeps it.
    if (this.#token()) queueMicrotask(() => this.refreshMe().subscribe({ error: () => undefined }));
  }

  signUp(request: SignUpRequest): Observable<Me> {
    return this.#http.post<unknown>('/api/v1/accounts', request).pipe(map(readMe));
  }

  signIn(request: SignInRequest): Observable<Me> {
    // Only a new session that cannot be read is forgotten: a sign-in that fails (offline, say) leaves
    // the session already open as it was.
    return this.#http.post<unknown>('/api/v1/sessions', request).pipe(
      map(readToken),
      switchMap((token) => {
        this.#remember(token);
        return this.refreshMe().pipe(tap({ error: () => this.#forget() }));
      }),
    );
  }

  /**
   * Takes over a session the server has already opened (accepting an invitation signs the new
   * account in): `body` is the session answer, `{ token, … }`. Opening another one would leave the
   * first unused on the server until it expires.
   */
  adoptSession(body: unknown): Observable<Me> {
    this.#remember(readToken(body));
    return this.refreshMe().pipe(tap({ error: () => this.#forget() }));
  }

  signOut(): Observable<void> {
    return this.#http.delete<unknown>('/api/v1/sessions/current').pipe(
      map(() => undefined),
      tap({ finalize: () => this.#forget() }),
    );
  }

  /** Reads the signed-in account again; a 401 means the session has ended. */
  refreshMe(): Observable<Me> {
    return this.#http
      .get<unknown>('/api/v1/me')
      .pipe(map(readMe), tap({ next: (me) => this.#rememberMe(me), error: (error: unknown) => this.#forgetIfUnauthorised(error) }));
  }

  #forgetIfUnauthorised(error: unknown): void {
    if (isRecord(error) && error['status'] === 401) this.#forget();
  }

  #rememberMe(me: Me): void {
    this.#me.set(me);
    try {
      localStorage.setItem(ME_KEY, JSON.stringify(me));
    } catch {
      // private browsing: known for as long as the page lasts
    }
  }

  #remember(token: string): void {
    this.#token.set(token);
    try {
      localStorage.setItem(TOKEN_KEY, token);
    } catch {
      // private browsing: the session lasts as long as the page
    }
  }

  #forget(): void {
    this.#token.set(null);
    this.#me.set(null);
    try {
      localStorage.removeItem(TOKEN_KEY);
      localStorage.removeItem(ME_KEY);
    } catch {
      // nothing stored
    }
  }
}
