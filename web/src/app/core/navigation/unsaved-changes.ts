import { inject, Injector } from '@angular/core';
import type { CanDeactivateFn } from '@angular/router';
import { firstValueFrom } from 'rxjs';

/** A page that holds edits the person has not saved yet. */
export interface HoldsUnsavedChanges {
  hasUnsavedChanges(): boolean;
  /** what the edits are to, for the question: "this study set" */
  readonly unsavedSubject: string;
}

/**
 * Route guard for editors: leaving with unsaved edits asks first. Closing or reloading the tab is
 * covered by the editor's own beforeunload handler. The question's dialog is loaded only when needed.
 */
export const unsavedChangesGuard: CanDeactivateFn<HoldsUnsavedChanges> = async (page) => {
  if (!page.hasUnsavedChanges()) return true;
  const injector = inject(Injector);
  const { askToLeave } = await import('./leave-unsaved-dialog');
  return firstValueFrom(askToLeave(injector, page.unsavedSubject));
};
