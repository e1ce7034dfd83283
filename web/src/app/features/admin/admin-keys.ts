import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { DatePipe, DecimalPipe } from '@angular/common';
import { MatButton } from '@angular/material/button';
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
import { forkJoin } from 'rxjs';
import { readableError } from '../../core/http/api-problem';
import { ConfirmDialog, type ConfirmData } from '../../shared/confirm-dialog';
import type { PartnerKey } from '../keys/key-service';
import { AdminService, type Person } from './admin-service';

type KeysState = { status: 'loading' } | { status: 'ready'; keys: PartnerKey[]; owners: Map<number, Person> } | { status: 'error'; message: string };

/** Every partner key, whose it is and what it used; any can be revoked. */
@Component({
  selector: 'sv-admin-keys',
  imports: [
    DatePipe,
    DecimalPipe,
    MatButton,
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
    <h2>Every partner key</h2>
    <p class="hint">Revoke a key that leaks or is misused: its requests are refused at once. Owners see the same on their Partner keys page.</p>
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
        <mat-progress-bar mode="indeterminate" aria-label="Loading partner keys" />
      }
      @case ('error') {
        <div class="problem" role="alert">
          <p>The keys could not be loaded. {{ listError() }}</p>
          <button mat-stroked-button type="button" (click)="load()">Try again</button>
        </div>
      }
      @case ('ready') {
        @if (keys().length === 0) {
          <p class="notice empty-state">Nobody has a partner key yet.</p>
        } @else {
          <div class="table-wrap" tabindex="0" role="region" aria-label="Every partner key (table)">
            <table mat-table [dataSource]="keys()" [trackBy]="trackKey">
              <caption class="visually-hidden">
                Every partner key, newest first
              </caption>
              <ng-container matColumnDef="name">
                <th mat-header-cell *matHeaderCellDef scope="col">Key</th>
                <td mat-cell *matCellDef="let key">
                  <span class="who"
                    ><strong>{{ key.name }}</strong
                    ><code class="email">{{ key.prefix }}…</code></span
                  >
                </td>
              </ng-container>
              <ng-container matColumnDef="owner">
                <th mat-header-cell *matHeaderCellDef scope="col">Owner</th>
                <td mat-cell *matCellDef="let key">{{ ownerName(key) }}</td>
              </ng-container>
              <ng-container matColumnDef="scopes">
                <th mat-header-cell *matHeaderCellDef scope="col">May do</th>
                <td mat-cell *matCellDef="let key">{{ key.scopes.join(', ') }}</td>
              </ng-container>
              <ng-container matColumnDef="created">
                <th mat-header-cell *matHeaderCellDef scope="col">Created</th>
                <td mat-cell *matCellDef="let key">{{ key.createdAt | date: 'd MMM y' }}</td>
              </ng-container>
              <ng-container matColumnDef="lastUsed">
                <th mat-header-cell *matHeaderCellDef scope="col">Last used</th>
                <td mat-cell *matCellDef="let key">{{ key.lastUsedAt ? (key.lastUsedAt | date: 'd MMM y, HH:mm') : 'never' }}</td>
              </ng-container>
              <ng-container matColumnDef="today">
                <th mat-header-cell *matHeaderCellDef scope="col">Today</th>
                <td mat-cell *matCellDef="let key">{{ key.usage.today | number }}</td>
              </ng-container>
              <ng-container matColumnDef="actions">
                <th mat-header-cell *matHeaderCellDef scope="col">State</th>
                <td mat-cell *matCellDef="let key">
                  @if (key.revokedAt) {
                    <span class="state-off">Revoked {{ key.revokedAt | date: 'd MMM y' }}</span>
                  } @else {
                    <button mat-button type="button" class="danger" (click)="confirmRevoke(key)">
                      Revoke…<span class="visually-hidden"> {{ key.name }}</span>
                    </button>
                  }
                </td>
              </ng-container>
              <tr mat-header-row *matHeaderRowDef="columns"></tr>
              <tr mat-row *matRowDef="let row; columns: columns" [attr.data-key-id]="row.id"></tr>
            </table>
          </div>
        }
      }
    }
  `,
  styleUrl: './admin.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AdminKeys {
  readonly #admin = inject(AdminService);
  readonly #dialog = inject(MatDialog);

  protected readonly columns = ['name', 'owner', 'scopes', 'created', 'lastUsed', 'today', 'actions'];
  protected readonly state = signal<KeysState>({ status: 'loading' });
  protected readonly problem = signal<string | null>(null);
  protected readonly done = signal<string | null>(null);

  protected readonly keys = computed(() => {
    const state = this.state();
    return state.status === 'ready' ? state.keys : [];
  });
  protected readonly listError = computed(() => {
    const state = this.state();
    return state.status === 'error' ? state.message : '';
  });
  protected readonly trackKey = (_index: number, key: PartnerKey) => key.id;

  constructor() {
    this.load();
  }

  protected ownerName(key: PartnerKey): string {
    const state = this.state();
    const owner = state.status === 'ready' ? state.owners.get(key.ownerId) : undefined;
    return owner ? `${owner.displayName} (${owner.email})` : `user ${key.ownerId}`;
  }

  protected load(): void {
    if (this.state().status !== 'ready') this.state.set({ status: 'loading' });
    forkJoin({ keys: this.#admin.allKeys(), people: this.#admin.people() }).subscribe({
      next: ({ keys, people }) =>
        this.state.set({ status: 'ready', keys: [...keys].sort((a, b) => b.id - a.id), owners: new Map(people.map((p) => [p.id, p])) }),
      error: (error: unknown) => this.state.set({ status: 'error', message: readableError(error) }),
    });
  }

  protected confirmRevoke(key: PartnerKey): void {
    const data: ConfirmData = {
      title: `Revoke “${key.name}”?`,
      lines: [
        `${this.ownerName(key)} holds this key (${key.prefix}…). Its requests are refused from now on; this cannot be undone, and the owner has to create a new key.`,
      ],
      confirm: 'Revoke key',
    };
    this.#dialog
      .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '480px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((confirmed) => {
        if (!confirmed) return;
        this.problem.set(null);
        this.done.set(null);
        this.#admin.revokeKey(key.id).subscribe({
          next: () => {
            this.done.set(`“${key.name}” is revoked.`);
            this.load();
          },
          error: (error: unknown) => this.problem.set(`The key was not revoked. ${readableError(error)}`),
        });
      });
  }
}
