import { ChangeDetectionStrategy, Component, computed, inject, signal, viewChild } from '@angular/core';
import { DatePipe } from '@angular/common';
import { HttpClient } from '@angular/common/http';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroupDirective, NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel, MatPrefix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect, type MatSelectChange } from '@angular/material/select';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatDialog } from '@angular/material/dialog';
import {
  MatCell,
  MatCellDef,
  MatColumnDef,
  MatHeaderCell,
  MatHeaderCellDef,
  MatHeaderRow,
  MatHeaderRowDef,
  MatRow,
  MatRowDef,
  MatTable,
} from '@angular/material/table';
import { catchError, map, of, startWith } from 'rxjs';
import { FIELD_LIMITS } from '@shared/engine';
import { AuthService } from '../../core/auth/auth-service';
import { ApiProblem, readableError } from '../../core/http/api-problem';
import { ConfirmDialog, type ConfirmData } from '../../shared/confirm-dialog';
import { AdminService, type Person, ROLES, type Role } from './admin-service';

type PeopleState = { status: 'loading' } | { status: 'ready'; people: Person[] } | { status: 'error'; message: string };

/** What each role may do, in a few words, for the role pickers. */
export const ROLE_WORDS: Record<Role, string> = {
  learner: 'Learner',
  coach: 'Coach',
  curator: 'Curator',
  reviewer: 'Reviewer',
  admin: 'Admin',
};

/** People: invite by e-mail with a role, find someone, change their role, deactivate or reactivate them. */
@Component({
  selector: 'sv-admin-people',
  imports: [
    ReactiveFormsModule,
    DatePipe,
    MatButton,
    MatFormField,
    MatLabel,
    MatHint,
    MatError,
    MatPrefix,
    MatInput,
    MatSelect,
    MatOption,
    MatIcon,
    MatProgressBar,
    MatTable,
    MatColumnDef,
    MatHeaderCellDef,
    MatHeaderCell,
    MatCellDef,
    MatCell,
    MatHeaderRowDef,
    MatHeaderRow,
    MatRowDef,
    MatRow,
  ],
  templateUrl: './admin-people.html',
  styleUrl: './admin.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AdminPeople {
  readonly #admin = inject(AdminService);
  readonly #dialog = inject(MatDialog);
  readonly #fb = inject(NonNullableFormBuilder);
  protected readonly auth = inject(AuthService);

  protected readonly roles = ROLES;
  protected readonly roleWords = ROLE_WORDS;
  protected readonly columns = ['who', 'role', 'state', 'lastSignIn', 'actions'];

  protected readonly invite = this.#fb.group({
    email: ['', [Validators.required, Validators.email, Validators.maxLength(FIELD_LIMITS.email.max)]],
    role: this.#fb.control<Role>('learner', Validators.required),
  });
  /** resetting through the directive also clears its submitted state, so the empty form shows no errors */
  private readonly inviteForm = viewChild(FormGroupDirective);
  protected readonly inviting = signal(false);
  protected readonly inviteProblem = signal<string | null>(null);
  protected readonly invited = signal<string | null>(null);

  protected readonly search = new FormControl('', { nonNullable: true });
  protected readonly roleFilter = new FormControl<Role | ''>('', { nonNullable: true });
  readonly #searchText = toSignal(this.search.valueChanges.pipe(startWith('')), { initialValue: '' });
  readonly #roleShown = toSignal(this.roleFilter.valueChanges.pipe(startWith('' as const)), { initialValue: '' as const });

  protected readonly state = signal<PeopleState>({ status: 'loading' });
  protected readonly rowProblem = signal<{ id: number; message: string } | null>(null);
  protected readonly changed = signal<string | null>(null);
  protected readonly busyId = signal<number | null>(null);
  /** the development mail catcher answers only outside production */
  protected readonly devMail = toSignal(
    inject(HttpClient)
      .get('/api/dev/mail', { headers: { Accept: 'application/json' } })
      .pipe(
        map(() => true),
        catchError(() => of(false)),
      ),
    { initialValue: false },
  );

  protected readonly listError = computed(() => {
    const state = this.state();
    return state.status === 'error' ? state.message : '';
  });
  protected readonly everyone = computed(() => {
    const state = this.state();
    return state.status === 'ready' ? state.people : [];
  });
  protected readonly shown = computed(() => {
    const words = this.#searchText().trim().toLowerCase();
    const role = this.#roleShown();
    return this.everyone().filter(
      (person) =>
        (role === '' || person.role === role) &&
        (words === '' || person.displayName.toLowerCase().includes(words) || person.email.toLowerCase().includes(words)),
    );
  });
  protected readonly myId = computed(() => Number(this.auth.me()?.id ?? 0));

  protected roleLabel(person: Person): string {
    return ROLE_WORDS[person.role];
  }

  protected readonly trackPerson = (_index: number, person: Person) => person.id;

  constructor() {
    this.loadPeople();
  }

  protected loadPeople(): void {
    if (this.state().status !== 'ready') this.state.set({ status: 'loading' });
    this.#admin.people().subscribe({
      next: (people) => this.state.set({ status: 'ready', people: [...people].sort((a, b) => a.displayName.localeCompare(b.displayName)) }),
      error: (error: unknown) => this.state.set({ status: 'error', message: readableError(error) }),
    });
  }

  protected sendInvitation(): void {
    this.invite.markAllAsTouched();
    if (this.invite.invalid || this.inviting()) return;
    const { email, role } = this.invite.getRawValue();
    this.inviting.set(true);
    this.inviteProblem.set(null);
    this.invited.set(null);
    this.#admin.invite(email.trim(), role).subscribe({
      next: (sent) => {
        this.inviting.set(false);
        const until = new Date(sent.expiresAt).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short' });
        this.invited.set(`Invitation sent to ${sent.email} as ${ROLE_WORDS[sent.role].toLowerCase()}. The link in it works once, until ${until}.`);
        this.inviteForm()?.resetForm({ email: '', role: 'learner' });
      },
      // what was typed stays; the server's reasons appear beside the fields they name
      error: (error: unknown) => {
        this.inviting.set(false);
        this.inviteProblem.set(`The invitation was not sent. ${readableError(error)}`);
        if (error instanceof ApiProblem) {
          for (const field of ['email', 'role'] as const) {
            const reason = error.reasonFor(field);
            if (reason) this.invite.controls[field].setErrors({ server: reason });
          }
        }
      },
    });
  }

  protected changeRole(person: Person, event: MatSelectChange<Role>): void {
    const role = event.value;
    if (role === person.role) return;
    this.#apply(
      person,
      { role },
      (updated) => `${updated.displayName} is now ${ROLE_WORDS[updated.role].toLowerCase()}.`,
      () => event.source.writeValue(person.role),
    );
  }

  protected confirmActive(person: Person): void {
    if (!person.active) {
      this.#apply(person, { active: true }, (updated) => `${updated.displayName} can sign in again.`);
      return;
    }
    const data: ConfirmData = {
      title: `Deactivate ${person.displayName}?`,
      lines: [
        `${person.email} will be signed out everywhere and cannot sign in until an admin reactivates the account.`,
        'Every partner key they hold is revoked for good; reactivating does not bring the keys back.',
      ],
      confirm: 'Deactivate',
    };
    this.#dialog
      .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '480px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((confirmed) => {
        if (confirmed) this.#apply(person, { active: false }, (updated) => `${updated.displayName} is deactivated.`);
      });
  }

  #apply(person: Person, change: { role?: Role; active?: boolean }, said: (updated: Person) => string, undo?: () => void): void {
    this.busyId.set(person.id);
    this.rowProblem.set(null);
    this.changed.set(null);
    this.#admin.changePerson(person.id, change).subscribe({
      next: (updated) => {
        this.busyId.set(null);
        this.changed.set(said(updated));
        this.state.update((state) =>
          state.status === 'ready' ? { status: 'ready', people: state.people.map((p) => (p.id === updated.id ? updated : p)) } : state,
        );
      },
      error: (error: unknown) => {
        this.busyId.set(null);
        undo?.();
        this.rowProblem.set({ id: person.id, message: `Nothing was changed for ${person.displayName}. ${readableError(error)}` });
      },
    });
  }
}
