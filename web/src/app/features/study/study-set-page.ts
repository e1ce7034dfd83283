import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { RouterLink } from '@angular/router';
import { Clipboard } from '@angular/cdk/clipboard';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { CAUTIONS, commonName } from '@shared/engine';
import { AuthService } from '../../core/auth/auth-service';
import { EditionService } from '../../core/edition/edition-service';
import { loadStudySet } from './study-set-loader';
import { eventDay, shareLink } from './study-words';

/** One study set as students see it: its species, and the way to its study sheet and drills. */
@Component({
  selector: 'sv-study-set-page',
  imports: [RouterLink, MatAnchor, MatButton, MatIcon, MatProgressBar],
  templateUrl: './study-set-page.html',
  styleUrl: './study.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class StudySetPage {
  readonly #clipboard = inject(Clipboard);
  readonly #snackBar = inject(MatSnackBar);
  readonly #auth = inject(AuthService);
  readonly #editions = inject(EditionService);

  /** the set's id from `/study/:id` */
  readonly id = input<string>();

  protected readonly loaded = loadStudySet(this.id);
  protected readonly set = this.loaded.set;
  protected readonly useCaution = CAUTIONS.use;
  protected readonly identificationCaution = CAUTIONS.identification;

  /** the owner or an admin may change the set (the server checks again) */
  protected readonly mayChange = computed(() => {
    const me = this.#auth.me();
    const set = this.set();
    return !!me && !!set && (me.role === 'admin' || (me.role === 'coach' && Number(me.id) === set.ownerId));
  });
  protected readonly link = computed(() => {
    const set = this.set();
    return set?.shared ? shareLink(set) : null;
  });
  protected readonly day = computed(() => eventDay(this.set()?.eventDate ?? null));

  protected readonly species = computed(() => {
    const compiled = this.#editions.compiled();
    return (this.set()?.taxa ?? []).map((taxon) => ({
      ...taxon,
      name: commonName(taxon),
      // unknown until the edition is here; then whether the edition holds the species
      inEdition: compiled ? compiled.taxonIndexById.has(taxon.id) : true,
    }));
  });

  protected copyLink(): void {
    const link = this.link();
    if (!link) return;
    const copied = this.#clipboard.copy(link);
    this.#snackBar.open(copied ? 'Link copied.' : `Copy this link: ${link}`, 'OK', { duration: copied ? 4000 : 15000 });
  }
}
