import { DestroyRef, Injectable, Injector, inject } from '@angular/core';
import { SwUpdate, type VersionReadyEvent } from '@angular/service-worker';
import { filter } from 'rxjs';

/** How often an open app asks the service worker to look for a new build of itself. */
const APP_CHECK_MS = 30 * 60 * 1000;

/**
 * Offers a new build of the app (service worker VERSION_READY). Newer editions of the matrix are
 * offered by the edition service itself, which only pages that sift load. The snack bar comes in a
 * chunk of its own, the first time there is something to say, so no page's first load carries it.
 */
@Injectable({ providedIn: 'root' })
export class AppUpdates {
  readonly #updates = inject(SwUpdate);
  readonly #injector = inject(Injector);
  readonly #destroyRef = inject(DestroyRef);

  start(): void {
    if (!this.#updates.isEnabled) return;
    const subscription = this.#updates.versionUpdates
      .pipe(filter((event): event is VersionReadyEvent => event.type === 'VERSION_READY'))
      .subscribe(() => void this.#offerReload());
    // Look at start-up (a field laptop may keep one tab open for days) and then now and again.
    const check = () => void this.#updates.checkForUpdate().catch(() => undefined);
    check();
    const appTimer = setInterval(check, APP_CHECK_MS);
    this.#destroyRef.onDestroy(() => {
      subscription.unsubscribe();
      clearInterval(appTimer);
    });
  }

  async #offerReload(): Promise<void> {
    const { MatSnackBar } = await import('@angular/material/snack-bar');
    this.#injector
      .get(MatSnackBar)
      .open('A new version of Sylvasift is ready.', 'Reload', { duration: 0 })
      .onAction()
      .subscribe(() => document.location.reload());
  }
}
