import { ChangeDetectionStrategy, Component, DestroyRef, ViewEncapsulation, computed, inject, input } from '@angular/core';
import { RouterLink } from '@angular/router';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { CAUTIONS, commonName } from '@shared/engine';
import { EditionService } from '../../core/edition/edition-service';
import { loadStudySet } from './study-set-loader';
import { diagnoseInSet, idsInEdition, keyForSet } from './study-sheet';
import { eventDay } from './study-words';

/** Set on <body> while the sheet is open, so print rules can leave the app's top bar off the paper. */
const PRINTING_CLASS = 'sv-study-sheet-open';

/** A printable study sheet: each species' separating traits within the set, and a two-way key. */
@Component({
  selector: 'sv-study-sheet-page',
  imports: [RouterLink, MatAnchor, MatButton, MatIcon, MatProgressBar],
  templateUrl: './study-sheet-page.html',
  styleUrl: './study-sheet-page.scss',
  // The sheet's print rules reach the app shell around it (top bar, footer links), so they are global.
  encapsulation: ViewEncapsulation.None,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class StudySheetPage {
  protected readonly editions = inject(EditionService);

  /** the set's id from `/study/:id/sheet` */
  readonly id = input<string>();

  protected readonly loaded = loadStudySet(this.id);
  protected readonly set = this.loaded.set;
  protected readonly day = computed(() => eventDay(this.set()?.eventDate ?? null));
  protected readonly cautions = [CAUTIONS.fieldSafety, CAUTIONS.use, CAUTIONS.identification];

  protected readonly ids = computed(() => {
    const compiled = this.editions.compiled();
    const set = this.set();
    return compiled && set
      ? idsInEdition(
          compiled,
          set.taxa.map((taxon) => taxon.id),
        )
      : [];
  });
  protected readonly missing = computed(() => {
    const compiled = this.editions.compiled();
    const set = this.set();
    if (!compiled || !set) return [];
    return set.taxa.filter((taxon) => !compiled.taxonIndexById.has(taxon.id)).map(commonName);
  });
  protected readonly diagnoses = computed(() => {
    const compiled = this.editions.compiled();
    const ids = this.ids();
    return compiled ? ids.map((id) => diagnoseInSet(compiled, id, ids)) : [];
  });
  protected readonly key = computed(() => {
    const compiled = this.editions.compiled();
    return compiled ? keyForSet(compiled, this.ids()) : [];
  });

  constructor() {
    document.body.classList.add(PRINTING_CLASS);
    inject(DestroyRef).onDestroy(() => document.body.classList.remove(PRINTING_CLASS));
  }

  /** Follows a "go to" on screen without changing the route's URL. */
  protected jumpTo(couplet: number): void {
    const target = document.getElementById(`couplet-${couplet}`);
    target?.scrollIntoView({ block: 'center' });
    target?.focus({ preventScroll: true });
  }

  protected printSheet(): void {
    window.print();
  }
}
