import { ChangeDetectionStrategy, Component, DOCUMENT, computed, inject, signal } from '@angular/core';
import { DatePipe, DecimalPipe } from '@angular/common';
import { Router } from '@angular/router';
import { MatButton } from '@angular/material/button';
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
import { AuthService } from '../../core/auth/auth-service';
import { ApiProblem, readableError } from '../../core/http/api-problem';
import { ConfirmDialog, type ConfirmData } from '../../shared/confirm-dialog';
import { AdminService, type Backup } from './admin-service';

type BackupsState = { status: 'loading' } | { status: 'ready'; backups: Backup[] } | { status: 'error'; message: string };

/** Everything a restore replaces: every table of the database, in words. */
export const RESTORE_REPLACES: readonly string[] = [
  'people, their roles, sessions and pending invitations and password resets',
  'partner keys and their usage',
  'the working matrix (species, traits, values, cells), published editions, photo records and the audit log',
  'queries and their history, and study sets',
];

function sizeWords(bytes: number): string {
  if (bytes < 1024) return `${bytes} bytes`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(0)} KB`;
  return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
}

/** Backups: make one now, download one, restore one after typing its name. */
@Component({
  selector: 'sv-admin-backups',
  imports: [
    DatePipe,
    DecimalPipe,
    MatButton,
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
  template: `
    <h2>Backups</h2>
    <p class="hint">A backup is a consistent copy of the whole database, kept on the server. Restoring one replaces everything with the backup's copy:</p>
    <ul class="replaced">
      @for (part of replaces; track part) {
        <li>{{ part }}</li>
      }
    </ul>
    <p class="hint">
      Photo files on disk are not part of a backup. Anything done since the backup was made is lost, and people signed in since then are signed out.
    </p>
    <div class="actions">
      <button mat-flat-button type="button" [disabled]="making()" (click)="makeBackup()">
        <mat-icon aria-hidden="true">backup</mat-icon>
        {{ making() ? 'Making a backup…' : 'Make a backup now' }}
      </button>
    </div>
    <div aria-live="polite">
      @if (done(); as message) {
        <p class="done">{{ message }}</p>
      }
    </div>
    @if (problem(); as message) {
      <p class="problem small" role="alert">{{ message }}</p>
    }
    @switch (state().status) {
      @case ('loading') {
        <mat-progress-bar mode="indeterminate" aria-label="Loading backups" />
      }
      @case ('error') {
        <div class="problem" role="alert">
          <p>The backups could not be loaded. {{ listError() }}</p>
          <button mat-stroked-button type="button" (click)="load()">Try again</button>
        </div>
      }
      @case ('ready') {
        @if (backups().length === 0) {
          <p class="notice empty-state">There is no backup yet. Make one before a large import or an upgrade.</p>
        } @else {
          <div class="table-wrap" tabindex="0" role="region" aria-label="Backups (table)">
            <table mat-table [dataSource]="backups()" [trackBy]="trackBackup">
              <caption class="visually-hidden">
                Backups, newest first
              </caption>
              <ng-container matColumnDef="name">
                <th mat-header-cell *matHeaderCellDef scope="col">Backup</th>
                <td mat-cell *matCellDef="let backup">
                  <code>{{ backup.name }}</code>
                </td>
              </ng-container>
              <ng-container matColumnDef="made">
                <th mat-header-cell *matHeaderCellDef scope="col">Made</th>
                <td mat-cell *matCellDef="let backup">{{ backup.createdAt | date: 'd MMM y, HH:mm:ss' }}</td>
              </ng-container>
              <ng-container matColumnDef="size">
                <th mat-header-cell *matHeaderCellDef scope="col">Size</th>
                <td mat-cell *matCellDef="let backup">{{ size(backup) }}</td>
              </ng-container>
              <ng-container matColumnDef="actions">
                <th mat-header-cell *matHeaderCellDef scope="col"><span class="visually-hidden">Actions</span></th>
                <td mat-cell *matCellDef="let backup">
                  <span class="row-actions">
                    <button mat-button type="button" (click)="download(backup)">
                      <mat-icon aria-hidden="true">download</mat-icon>Download<span class="visually-hidden"> {{ backup.name }}</span>
                    </button>
                    <button mat-button type="button" class="danger" [disabled]="restoring() !== null" (click)="confirmRestore(backup)">
                      <mat-icon aria-hidden="true">settings_backup_restore</mat-icon>Restore…<span class="visually-hidden"> {{ backup.name }}</span>
                    </button>
                  </span>
                </td>
              </ng-container>
              <tr mat-header-row *matHeaderRowDef="columns"></tr>
              <tr mat-row *matRowDef="let row; columns: columns" [attr.data-backup]="row.name"></tr>
            </table>
          </div>
          <p class="hint">{{ backups().length | number }} backup{{ backups().length === 1 ? '' : 's' }}.</p>
        }
      }
    }
    @if (restoring()) {
      <mat-progress-bar mode="indeterminate" aria-label="Restoring" />
    }
  `,
  styleUrl: './admin.scss',
  styles: `
    .actions {
      margin: 12px 0;
    }
    .row-actions {
      display: flex;
      flex-wrap: wrap;
      gap: 4px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AdminBackups {
  readonly #admin = inject(AdminService);
  readonly #dialog = inject(MatDialog);
  readonly #auth = inject(AuthService);
  readonly #router = inject(Router);
  readonly #document = inject(DOCUMENT);

  protected readonly replaces = RESTORE_REPLACES;
  protected readonly columns = ['name', 'made', 'size', 'actions'];
  protected readonly state = signal<BackupsState>({ status: 'loading' });
  protected readonly making = signal(false);
  protected readonly restoring = signal<string | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly done = signal<string | null>(null);

  protected readonly backups = computed(() => {
    const state = this.state();
    return state.status === 'ready' ? state.backups : [];
  });
  protected readonly listError = computed(() => {
    const state = this.state();
    return state.status === 'error' ? state.message : '';
  });
  protected readonly trackBackup = (_index: number, backup: Backup) => backup.name;

  constructor() {
    this.load();
  }

  protected size(backup: Backup): string {
    return sizeWords(backup.bytes);
  }

  protected load(): void {
    if (this.state().status !== 'ready') this.state.set({ status: 'loading' });
    this.#admin.backups().subscribe({
      next: (backups) => this.state.set({ status: 'ready', backups }),
      error: (error: unknown) => this.state.set({ status: 'error', message: readableError(error) }),
    });
  }

  protected makeBackup(): void {
    this.making.set(true);
    this.problem.set(null);
    this.done.set(null);
    this.#admin.createBackup().subscribe({
      next: (backup) => {
        this.making.set(false);
        this.done.set(`Backup ${backup.name} made (${sizeWords(backup.bytes)}).`);
        this.load();
      },
      error: (error: unknown) => {
        this.making.set(false);
        this.problem.set(`No backup was made. ${readableError(error)}`);
      },
    });
  }

  protected download(backup: Backup): void {
    this.problem.set(null);
    this.#admin.downloadBackup(backup.name).subscribe({
      next: (blob) => {
        const url = URL.createObjectURL(blob);
        const link = this.#document.createElement('a');
        link.href = url;
        link.download = backup.name;
        this.#document.body.appendChild(link);
        link.click();
        link.remove();
        setTimeout(() => URL.revokeObjectURL(url), 10_000);
      },
      error: (error: unknown) => this.problem.set(`The backup was not downloaded. ${readableError(error)}`),
    });
  }

  protected confirmRestore(backup: Backup): void {
    const made = new Date(backup.createdAt).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'medium' });
    const data: ConfirmData = {
      title: 'Restore this backup?',
      lines: [
        `Everything in the database is replaced by the copy made ${made}: ${RESTORE_REPLACES.join('; ')}.`,
        'Whatever was done since then is lost, and cannot be brought back unless you make a backup first. People signed in since then are signed out, perhaps you too.',
      ],
      confirm: 'Replace everything',
      typeToConfirm: { label: 'Name of the backup to restore', text: backup.name },
    };
    this.#dialog
      .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '560px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((confirmed) => {
        if (confirmed) this.#restore(backup);
      });
  }

  #restore(backup: Backup): void {
    this.restoring.set(backup.name);
    this.problem.set(null);
    this.done.set(null);
    this.#admin.restoreBackup(backup.name).subscribe({
      next: () => {
        this.restoring.set(null);
        this.done.set(`Restored from ${backup.name}. Everything is as it was when that backup was made.`);
        // the session may not be in the restored data: read the account again, and go to sign-in if it is gone
        this.#auth.refreshMe().subscribe({
          next: () => this.load(),
          error: (error: unknown) => {
            if (error instanceof ApiProblem && error.status === 401) void this.#router.navigate(['/sign-in'], { queryParams: { next: '/admin' } });
          },
        });
      },
      error: (error: unknown) => {
        this.restoring.set(null);
        this.problem.set(`Nothing was restored. ${readableError(error)}`);
      },
    });
  }
}
