import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { DatePipe } from '@angular/common';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { FormSubmission } from '../../core/forms/form-submission';
import { readableError } from '../../core/http/api-problem';
import { confirmPublish } from './confirm-publish-dialog';
import { DeskService, type DraftSummary, type Edition, type EditionSummary } from './desk-service';
import { DeskTabs } from './desk-tabs';

type Loaded<T> = { status: 'loading' } | { status: 'ready'; value: T } | { status: 'error'; message: string };

/** A change summary in a line: "3 cells changed · 1 taxon added". */
export function summaryLine(summary: EditionSummary): string {
  const plural = (count: number, one: string, many: string) => `${count} ${count === 1 ? one : many}`;
  const parts = [plural(summary.cellsChanged, 'cell changed', 'cells changed')];
  if (summary.taxaAdded.length) parts.push(plural(summary.taxaAdded.length, 'taxon added', 'taxa added'));
  if (summary.taxaRemoved.length) parts.push(plural(summary.taxaRemoved.length, 'taxon removed', 'taxa removed'));
  if (summary.traitsAdded.length) parts.push(plural(summary.traitsAdded.length, 'trait added', 'traits added'));
  if (summary.traitsRemoved.length) parts.push(plural(summary.traitsRemoved.length, 'trait removed', 'traits removed'));
  return `${parts.join(' · ')} — ${plural(summary.taxonCount, 'taxon', 'taxa')} × ${plural(summary.traitCount, 'trait', 'traits')}`;
}

/**
 * Editions: what the draft would change, publishing it as the next edition (with a title and a
 * reason, after a confirmation), and every edition published so far with its change summary.
 */
@Component({
  selector: 'sv-editions-page',
  imports: [ReactiveFormsModule, DatePipe, RouterLink, MatButton, MatFormField, MatLabel, MatHint, MatError, MatInput, MatProgressBar, DeskTabs],
  templateUrl: './editions-page.html',
  styleUrl: './desk-pages.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class EditionsPage {
  readonly #desk = inject(DeskService);
  readonly #dialog = inject(MatDialog);
  readonly #fb = inject(NonNullableFormBuilder);

  protected readonly summaryLine = summaryLine;
  protected readonly draft = signal<Loaded<DraftSummary>>({ status: 'loading' });
  protected readonly editions = signal<Loaded<{ current: number | null; editions: Edition[] }>>({ status: 'loading' });
  protected readonly notice = signal('');
  protected readonly submission = new FormSubmission();
  protected readonly form = this.#fb.group({
    title: ['', [Validators.required, Validators.maxLength(200)]],
    reason: ['', [Validators.required, Validators.minLength(3), Validators.maxLength(2000)]],
  });

  constructor() {
    this.load();
  }

  protected load(): void {
    this.draft.set({ status: 'loading' });
    this.editions.set({ status: 'loading' });
    this.#desk.draftSummary().subscribe({
      next: (value) => this.draft.set({ status: 'ready', value }),
      error: (error: unknown) => this.draft.set({ status: 'error', message: readableError(error) }),
    });
    this.#desk.editions().subscribe({
      next: (value) => this.editions.set({ status: 'ready', value: { ...value, editions: [...value.editions].sort((a, b) => b.number - a.number) } }),
      error: (error: unknown) => this.editions.set({ status: 'error', message: readableError(error) }),
    });
  }

  protected fieldError(name: 'title' | 'reason'): string | null {
    const control = this.form.controls[name];
    if (control.hasError('required'))
      return name === 'title' ? 'Give the edition a title.' : 'Say why this edition is published; it is kept in the change log.';
    if (control.hasError('minlength')) return 'Write at least 3 characters.';
    if (control.hasError('maxlength')) return name === 'title' ? 'At most 200 characters.' : 'At most 2000 characters.';
    return (control.getError('server') as string | undefined) ?? null;
  }

  protected publish(): void {
    const draft = this.draft();
    const summary = draft.status === 'ready' ? draft.value.summary : null;
    const title = this.form.controls.title.value.trim();
    this.submission.submit(
      this.form,
      () => this.#desk.publish(title, this.form.controls.reason.value.trim()),
      (edition) => {
        this.notice.set(`Edition ${edition.number}, “${edition.title}”, is published: the sift and partner apps use it from now on.`);
        this.form.reset();
        this.load();
      },
      {
        confirm: () =>
          confirmPublish(this.#dialog, {
            title,
            lines: [
              summary ? `It holds ${summaryLine(summary)}.` : 'It holds the working matrix as it is now.',
              'Once published an edition never changes; the sift, species pages and partner apps switch to it at once.',
            ],
          }),
      },
    );
  }
}
