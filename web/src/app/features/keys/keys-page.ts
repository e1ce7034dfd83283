import { ChangeDetectionStrategy, Component, DOCUMENT, type ElementRef, computed, inject, signal, viewChild } from '@angular/core';
import { DatePipe, DecimalPipe } from '@angular/common';
import { FormGroupDirective, NonNullableFormBuilder, ReactiveFormsModule, Validators, type AbstractControl, type ValidationErrors } from '@angular/forms';
import { CdkCopyToClipboard } from '@angular/cdk/clipboard';
import { MatButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatDialog } from '@angular/material/dialog';
import { FIELD_LIMITS } from '@shared/engine';
import { ApiProblem, readableError } from '../../core/http/api-problem';
import { ConfirmDialog, type ConfirmData } from '../../shared/confirm-dialog';
import { type CreatedKey, KEY_SCOPES, type KeyScope, KeyService, type KeyUsage, type PartnerKey } from './key-service';
import { UsageChart } from './usage-chart';

type ListState = { status: 'loading' } | { status: 'ready'; keys: PartnerKey[] } | { status: 'error'; message: string };
type UsageState = { status: 'loading' } | { status: 'ready'; usage: KeyUsage } | { status: 'error'; message: string };

const SCOPE_WORDS: Record<KeyScope, string> = {
  lookup: 'published species, traits, editions and photos',
  identify: 'sifting: a ranked shortlist from observations',
};

const atLeastOneScope = (group: AbstractControl): ValidationErrors | null =>
  Object.values((group.value ?? {}) as Record<string, boolean>).some(Boolean) ? null : { noScope: true };

/** Partner keys: create one (its secret shown once), see what each has used, revoke. */
@Component({
  selector: 'sv-keys-page',
  imports: [
    ReactiveFormsModule,
    DatePipe,
    DecimalPipe,
    CdkCopyToClipboard,
    MatButton,
    MatCheckbox,
    MatFormField,
    MatLabel,
    MatHint,
    MatError,
    MatInput,
    MatIcon,
    MatProgressBar,
    UsageChart,
  ],
  templateUrl: './keys-page.html',
  styleUrl: './keys-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class KeysPage {
  readonly #keys = inject(KeyService);
  readonly #dialog = inject(MatDialog);
  readonly #fb = inject(NonNullableFormBuilder);
  readonly #origin = inject(DOCUMENT).location.origin;

  protected readonly scopes = KEY_SCOPES;
  protected readonly scopeWords = SCOPE_WORDS;
  protected readonly form = this.#fb.group({
    name: ['', [Validators.required, Validators.maxLength(FIELD_LIMITS.keyName.max), Validators.pattern(/\S/)]],
    scopes: this.#fb.group({ lookup: true, identify: true }, { validators: atLeastOneScope }),
  });

  protected readonly list = signal<ListState>({ status: 'loading' });
  protected readonly creating = signal(false);
  protected readonly createProblem = signal<string | null>(null);
  protected readonly created = signal<CreatedKey | null>(null);
  protected readonly copied = signal<'key' | 'curl' | null>(null);
  protected readonly expanded = signal<number | null>(null);
  protected readonly usage = signal<UsageState>({ status: 'loading' });
  protected readonly revokeProblem = signal<{ id: number; message: string } | null>(null);

  protected readonly createdPanel = viewChild<ElementRef<HTMLElement>>('createdPanel');
  /** resetting through the directive also clears its submitted state, so the empty form shows no errors */
  private readonly formDirective = viewChild(FormGroupDirective);

  protected readonly keys = computed(() => {
    const list = this.list();
    return list.status === 'ready' ? list.keys : [];
  });
  protected readonly listError = computed(() => {
    const list = this.list();
    return list.status === 'error' ? list.message : '';
  });
  protected readonly report = computed(() => {
    const usage = this.usage();
    return usage.status === 'ready' ? usage.usage : null;
  });
  protected readonly usageError = computed(() => {
    const usage = this.usage();
    return usage.status === 'error' ? usage.message : '';
  });
  protected readonly curl = computed(() => {
    const created = this.created();
    return created ? curlExample(this.#origin, created.key) : '';
  });

  constructor() {
    this.loadKeys();
  }

  protected loadKeys(): void {
    if (this.list().status !== 'ready') this.list.set({ status: 'loading' });
    this.#keys.listOwn().subscribe({
      next: (keys) => this.list.set({ status: 'ready', keys: [...keys].sort((a, b) => b.id - a.id) }),
      error: (error: unknown) => this.list.set({ status: 'error', message: readableError(error) }),
    });
  }

  protected createKey(): void {
    this.form.markAllAsTouched();
    if (this.form.invalid || this.creating()) return;
    const { name, scopes } = this.form.getRawValue();
    const chosen = KEY_SCOPES.filter((scope) => scopes[scope]);
    this.creating.set(true);
    this.createProblem.set(null);
    this.#keys.create(name.trim(), chosen).subscribe({
      next: (key) => {
        this.creating.set(false);
        this.created.set(key);
        this.copied.set(null);
        this.formDirective()?.resetForm({ name: '', scopes: { lookup: true, identify: true } });
        this.loadKeys();
        this.showUsage(key.id);
        // the secret is the one thing to act on now: bring it into view and put the focus on it
        queueMicrotask(() => setTimeout(() => this.createdPanel()?.nativeElement.focus(), 0));
      },
      // what was typed stays; the server's reasons appear beside the fields they name
      error: (error: unknown) => {
        this.creating.set(false);
        this.createProblem.set(`The key was not created. ${readableError(error)}`);
        if (error instanceof ApiProblem) {
          const reason = error.reasonFor('name');
          if (reason) this.form.controls.name.setErrors({ server: reason });
          const scopeReason = error.reasonFor('scopes');
          if (scopeReason) this.form.controls.scopes.setErrors({ server: scopeReason });
        }
      },
    });
  }

  protected dismissCreated(): void {
    this.created.set(null);
  }

  protected showCopied(what: 'key' | 'curl', ok: boolean): void {
    this.copied.set(ok ? what : null);
  }

  protected toggleUsage(id: number): void {
    if (this.expanded() === id) {
      this.expanded.set(null);
      return;
    }
    this.showUsage(id);
  }

  protected showUsage(id: number): void {
    this.expanded.set(id);
    this.usage.set({ status: 'loading' });
    this.refreshUsage(id);
  }

  protected refreshUsage(id: number): void {
    this.#keys.usage(id).subscribe({
      next: (usage) => {
        if (this.expanded() === id) this.usage.set({ status: 'ready', usage });
      },
      error: (error: unknown) => {
        if (this.expanded() === id) this.usage.set({ status: 'error', message: readableError(error) });
      },
    });
  }

  protected confirmRevoke(key: PartnerKey): void {
    const data: ConfirmData = {
      title: `Revoke “${key.name}”?`,
      lines: [
        `Requests with the key ${key.prefix}… will be refused from now on (401). This cannot be undone; an app that still uses it stops working.`,
        'Its usage stays on this page.',
      ],
      confirm: 'Revoke key',
    };
    this.#dialog
      .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '480px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((confirmed) => {
        if (!confirmed) return;
        this.revokeProblem.set(null);
        this.#keys.revoke(key.id).subscribe({
          next: () => {
            if (this.created()?.id === key.id) this.created.set(null);
            this.loadKeys();
          },
          error: (error: unknown) => this.revokeProblem.set({ id: key.id, message: `The key was not revoked. ${readableError(error)}` }),
        });
      });
  }
}

/** A ready-to-paste identify call with the new key (the observation shape of openapi.yaml). */
export function curlExample(origin: string, key: string): string {
  const body = JSON.stringify({ observations: [{ trait: 'needles-per-fascicle', values: [3] }] });
  return `curl -H 'Authorization: Bearer ${key}' -H 'Content-Type: application/json' -d '${body}' ${origin}/api/v1/identify`;
}
