import { Injectable, signal } from '@angular/core';

/**
 * Which cautions the current page already shows beside its own results, so the footer does not
 * repeat them on the same screen.
 */
@Injectable({ providedIn: 'root' })
export class PageCautions {
  /** true while a page shows the identification caution next to its ranking */
  readonly identificationShown = signal(false);
}
