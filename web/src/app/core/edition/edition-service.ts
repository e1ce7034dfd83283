import { DestroyRef, Injectable, computed, inject, signal } from '@angular/core';
import { HttpClient, type HttpHeaders } from '@angular/common/http';
import { decodeBundle, type CompiledMatrix } from '@shared/engine';
import { readableError } from '../http/api-problem';
import { BUNDLE_URL } from './edition-url';

export const EDITIONS_URL = '/api/v1/editions';
/** How often an open sift asks whether a newer edition has been published. */
const EDITION_CHECK_MS = 10 * 60 * 1000;

/** The edition the browser sifts with, decoded once from the binary bundle. */
export interface LoadedEdition {
  number: number | null;
  publishedAt: string | null;
  etag: string | null;
  compiled: CompiledMatrix;
}

export type EditionState = { status: 'loading' } | { status: 'ready'; edition: LoadedEdition } | { status: 'error'; message: string };

function editionNumberFrom(headers: HttpHeaders): number | null {
  const text = headers.get('X-Sylvasift-Edition');
  const number = text === null ? NaN : Number(text);
  return Number.isInteger(number) && number > 0 ? number : null;
}

/**
 * Downloads and decodes the current edition bundle. The service worker keeps the last bundle, so
 * the same request answers from the device when the network is gone; `online` says which it was.
 */
@Injectable({ providedIn: 'root' })
export class EditionService {
  readonly #http = inject(HttpClient);
  readonly #state = signal<EditionState>({ status: 'loading' });
  readonly #online = signal(typeof navigator === 'undefined' ? true : navigator.onLine);
  readonly #newerEdition = signal<number | null>(null);

  readonly state = this.#state.asReadonly();
  readonly online = this.#online.asReadonly();
  /** the number of a published edition newer than the loaded one, once one is seen */
  readonly newerEdition = this.#newerEdition.asReadonly();
  readonly compiled = computed(() => {
    const state = this.#state();
    return state.status === 'ready' ? state.edition.compiled : null;
  });
  readonly edition = computed(() => {
    const state = this.#state();
    return state.status === 'ready' ? state.edition : null;
  });

  constructor() {
    const updateOnline = () => {
      this.#online.set(navigator.onLine);
      if (navigator.onLine) this.checkForNewerEdition();
    };
    window.addEventListener('online', updateOnline);
    window.addEventListener('offline', updateOnline);
    const timer = setInterval(() => this.checkForNewerEdition(), EDITION_CHECK_MS);
    inject(DestroyRef).onDestroy(() => {
      window.removeEventListener('online', updateOnline);
      window.removeEventListener('offline', updateOnline);
      clearInterval(timer);
    });
    this.load();
  }

  /**
   * (Re)downloads the current bundle; the previous edition stays in use until the new one decodes.
   * `revalidate` asks the server past any cached copy (the bundle is cached for a few minutes), as
   * when a newer edition has been announced.
   */
  load(revalidate = false): void {
    if (this.#state().status !== 'ready') this.#state.set({ status: 'loading' });
    const cache: RequestCache = revalidate ? 'no-cache' : 'default';
    this.#http.get(BUNDLE_URL, { observe: 'response', responseType: 'arraybuffer', cache }).subscribe({
      next: (response) => {
        try {
          const body = response.body;
          if (!body) throw new Error('The edition bundle came back empty.');
          const compiled = decodeBundle(new Uint8Array(body));
          this.#newerEdition.set(null);
          this.#state.set({
            status: 'ready',
            edition: {
              number: editionNumberFrom(response.headers),
              publishedAt: response.headers.get('Last-Modified'),
              etag: response.headers.get('ETag'),
              compiled,
            },
          });
        } catch (error) {
          this.#failUnlessReady(`The edition bundle could not be read: ${readableError(error)}`);
        }
      },
      error: (error: unknown) => this.#failUnlessReady(readableError(error)),
    });
  }

  /** Asks the server for the newest edition number; a newer one than loaded is offered as an update. */
  checkForNewerEdition(): void {
    const loaded = this.edition()?.number;
    if (loaded === null || loaded === undefined) return;
    this.#http.get<unknown>(EDITIONS_URL, { cache: 'no-cache' }).subscribe({
      next: (body) => {
        const current = typeof body === 'object' && body !== null ? (body as Record<string, unknown>)['current'] : undefined;
        if (typeof current === 'number' && current > loaded) this.#newerEdition.set(current);
      },
      // No answer means we stay on the edition we have; the sift keeps working.
      error: () => undefined,
    });
  }

  #failUnlessReady(message: string): void {
    if (this.#state().status !== 'ready') this.#state.set({ status: 'error', message });
  }
}
