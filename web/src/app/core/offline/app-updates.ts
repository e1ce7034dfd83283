import { DestroyRef, Injectable, inject } from '@angular/core';
import { SwUpdate, type VersionReadyEvent } from '@angular/service-worker';
import { MatSnackBar } from '@angular/material/snack-bar';
import { filter } from 'rxjs';
import { EditionService } from '../edition/edition-service';

/** How often an open app asks whether a newer edition has been published. */
const EDITION_CHECK_MS = 10 * 60 * 1000;
/** How often an open app asks the service worker to look for a new build of itself. */
const APP_CHECK_MS = 30 * 60 * 1000;

/**
 * Offers updates: a new build of the app (service worker VERSION_READY) and a newer published
 * edition of the matrix (compared with the one the browser has loaded).
 */
@Injectable({ providedIn: 'root' })
export class AppUpdates {
  readonly #updates = inject(SwUpdate);
  readonly #snackBar = inject(MatSnackBar);
  readonly #editions = inject(EditionService);
  readonly #destroyRef = inject(DestroyRef);

  start(): void {
    if (this.#updates.isEnabled) {
      const subscription = this.#updates.versionUpdates
        .pipe(filter((event): event is VersionReadyEvent => event.type === 'VERSION_READY'))
        .subscribe(() => {
          this.#snackBar
            .open('A new version of Sylvasift is ready.', 'Reload', { duration: 0 })
            .onAction()
            .subscribe(() => document.location.reload());
        });
      // Look at start-up (a field laptop may keep one tab open for days) and then now and again.
      const check = () => void this.#updates.checkForUpdate().catch(() => undefined);
      check();
      const appTimer = setInterval(check, APP_CHECK_MS);
      this.#destroyRef.onDestroy(() => {
        subscription.unsubscribe();
        clearInterval(appTimer);
      });
    }
    const timer = setInterval(() => this.#editions.checkForNewerEdition(), EDITION_CHECK_MS);
    this.#destroyRef.onDestroy(() => clearInterval(timer));
  }
}
