import { type Signal, computed, effect, inject, signal, untracked } from '@angular/core';
import { type StudySet, StudyService } from '../../core/api/study-service';
import { readableError } from '../../core/http/api-problem';
import { studySetId } from './study-words';

export type StudySetState = { status: 'loading' } | { status: 'ready'; set: StudySet; fromDevice: boolean } | { status: 'error'; message: string };

export interface LoadedStudySetSignals {
  state: Signal<StudySetState>;
  set: Signal<StudySet | null>;
  reload(): void;
}

/**
 * Loads the study set named by a route's `:id` whenever it changes. Call in an injection context
 * (a field initialiser of a page).
 */
export function loadStudySet(id: Signal<string | undefined>): LoadedStudySetSignals {
  const study = inject(StudyService);
  const state = signal<StudySetState>({ status: 'loading' });
  const load = (text: string | undefined) => {
    const setId = studySetId(text);
    if (setId === null) {
      state.set({ status: 'error', message: 'There is no study set at this address.' });
      return;
    }
    state.set({ status: 'loading' });
    study.loadSet(setId).subscribe({
      next: ({ set, fromDevice }) => state.set({ status: 'ready', set, fromDevice }),
      error: (error: unknown) => state.set({ status: 'error', message: readableError(error) }),
    });
  };
  effect(() => {
    const text = id();
    untracked(() => load(text));
  });
  return {
    state: state.asReadonly(),
    set: computed(() => {
      const current = state();
      return current.status === 'ready' ? current.set : null;
    }),
    reload: () => load(untracked(id)),
  };
}
