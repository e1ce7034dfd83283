import { Injectable } from '@angular/core';
import { BUNDLE_URL } from '../edition/edition-url';

/** How long after the page has loaded the bundle may wait for an idle moment, at most. */
const IDLE_TIMEOUT_MS = 5_000;

/**
 * Fetches the current edition bundle once the page has loaded and the browser is idle, without
 * decoding it: the service worker keeps it, so a person who only opened the home page can still sift
 * offline later. The engine and the decoding stay in the sift's own chunk.
 */
@Injectable({ providedIn: 'root' })
export class EditionPrefetch {
  #started = false;

  start(): void {
    if (this.#started || typeof window === 'undefined') return;
    this.#started = true;
    const fetchBundle = () =>
      void fetch(BUNDLE_URL, { credentials: 'same-origin' })
        .then((response) => response.arrayBuffer())
        .catch(() => undefined);
    const whenIdle = () =>
      typeof requestIdleCallback === 'function' ? requestIdleCallback(fetchBundle, { timeout: IDLE_TIMEOUT_MS }) : setTimeout(fetchBundle, IDLE_TIMEOUT_MS);
    if (document.readyState === 'complete') whenIdle();
    else window.addEventListener('load', whenIdle, { once: true });
  }
}
