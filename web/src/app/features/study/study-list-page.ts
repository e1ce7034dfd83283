import { ChangeDetectionStrategy, Component, computed, effect, inject, signal, untracked } from '@angular/core';
import { NgTemplateOutlet } from '@angular/common';
import { RouterLink } from '@angular/router';
import { Clipboard } from '@angular/cdk/clipboard';
import { MatDialog } from '@angular/material/dialog';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { commonName } from '@shared/engine';
import { AuthService } from '../../core/auth/auth-service';
import { type StudySet, StudyService } from '../../core/api/study-service';
import { readableError } from '../../core/http/api-problem';
import { ConfirmDeleteDialog, type ConfirmDeleteData } from './confirm-delete-dialog';
import { eventDay, keepsStudySets, shareLink } from './study-words';

type ListState = { status: 'loading' } | { status: 'ready'; sets: StudySet[] } | { status: 'error'; message: string };

/** A coach's study sets: make, open, drill, share and delete them. */
@Component({
  selector: 'sv-study-list-page',
  imports: [NgTemplateOutlet, RouterLink, MatAnchor, MatButton, MatIcon, MatProgressBar],
  templateUrl: './study-list-page.html',
  styleUrl: './study.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class StudyListPage {
  readonly #study = inject(StudyService);
  readonly #dialog = inject(MatDialog);
  readonly #snackBar = inject(MatSnackBar);
  readonly #clipboard = inject(Clipboard);
  protected readonly auth = inject(AuthService);

  protected readonly state = signal<ListState>({ status: 'loading' });
  protected readonly deleting = signal<number | null>(null);
  protected readonly problem = signal<string | null>(null);
  /** null while the account is still being read */
  protected readonly keepsSets = computed(() => {
    const me = this.auth.me();
    return me ? keepsStudySets(me.role) : null;
  });

  protected readonly sets = computed(() => {
    const state = this.state();
    return state.status === 'ready' ? state.sets : [];
  });
  protected readonly errorMessage = computed(() => {
    const state = this.state();
    return state.status === 'error' ? state.message : '';
  });
  protected readonly ownId = computed(() => Number(this.auth.me()?.id));
  /** other people's shared sets opened on this device, kept there for offline drills */
  protected readonly sharedWithMe = computed(() => {
    const me = this.auth.me();
    return me ? this.#study.sharedSetsOpenedHere(Number(me.id)) : [];
  });
  protected readonly exampleLink = shareLink({ id: 12 });

  protected readonly eventDay = eventDay;
  protected readonly speciesName = commonName;

  constructor() {
    // Only coaches and admins have sets to list; the page waits until it knows who is signed in.
    effect(() => {
      if (this.keepsSets()) untracked(() => this.loadSets());
    });
  }

  protected loadSets(): void {
    this.state.set({ status: 'loading' });
    this.#study.listSets().subscribe({
      next: (sets) => this.state.set({ status: 'ready', sets }),
      error: (error: unknown) => this.state.set({ status: 'error', message: readableError(error) }),
    });
  }

  protected firstSpecies(set: StudySet): string {
    const names = set.taxa.slice(0, 4).map(commonName);
    return set.taxa.length > 4 ? `${names.join(', ')} and ${set.taxa.length - 4} more` : names.join(', ');
  }

  protected copyLink(set: StudySet): void {
    const copied = this.#clipboard.copy(shareLink(set));
    this.#snackBar.open(copied ? `Link to “${set.name}” copied.` : `Copy this link: ${shareLink(set)}`, 'OK', { duration: copied ? 4000 : 15000 });
  }

  protected confirmDelete(set: StudySet): void {
    const data: ConfirmDeleteData = { name: set.name, speciesCount: set.taxa.length, shared: set.shared };
    this.#dialog
      .open<ConfirmDeleteDialog, ConfirmDeleteData, boolean>(ConfirmDeleteDialog, { data, autoFocus: 'first-tabbable', restoreFocus: true })
      .afterClosed()
      .subscribe((confirmed) => {
        if (confirmed === true) this.#delete(set);
      });
  }

  #delete(set: StudySet): void {
    this.deleting.set(set.id);
    this.problem.set(null);
    this.#study.deleteSet(set.id).subscribe({
      next: () => {
        this.deleting.set(null);
        this.state.update((state) => (state.status === 'ready' ? { status: 'ready', sets: state.sets.filter((kept) => kept.id !== set.id) } : state));
        this.#snackBar.open(`Deleted “${set.name}”.`, undefined, { duration: 4000 });
      },
      error: (error: unknown) => {
        this.deleting.set(null);
        this.problem.set(`“${set.name}” was not deleted. ${readableError(error)}`);
      },
    });
  }
}
