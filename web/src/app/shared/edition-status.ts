import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatIcon } from '@angular/material/icon';
import { MatButton } from '@angular/material/button';
import { EditionService } from '../core/edition/edition-service';

/** Which edition the sift runs on, whether it is offline, and an offer when a newer one is out. */
@Component({
  selector: 'sv-edition-status',
  imports: [MatIcon, MatButton],
  template: `
    <div class="status" role="status" aria-live="polite">
      @if (edition(); as loaded) {
        @if (editions.online()) {
          <span class="badge" data-state="online">
            <mat-icon aria-hidden="true">cloud_done</mat-icon>
            {{ label() }}
          </span>
        } @else {
          <span class="badge offline" data-state="offline">
            <mat-icon aria-hidden="true">cloud_off</mat-icon>
            Offline — using {{ label().toLowerCase() }} saved on this device
          </span>
        }
      }
      @if (editions.newerEdition(); as newer) {
        <span class="newer">
          Edition {{ newer }} is published.
          <button mat-button type="button" (click)="editions.load(true)">Load edition {{ newer }}</button>
        </span>
      }
    </div>
  `,
  styles: `
    .status {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px;
      font: var(--mat-sys-label-large);
    }
    .badge {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      padding: 4px 10px;
      border-radius: 16px;
      background: var(--mat-sys-secondary-container);
      color: var(--mat-sys-on-secondary-container);
    }
    .badge.offline {
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
    }
    mat-icon {
      font-size: 18px;
      width: 18px;
      height: 18px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EditionStatus {
  protected readonly editions = inject(EditionService);
  protected readonly edition = this.editions.edition;
  protected readonly label = computed(() => {
    const number = this.edition()?.number;
    return number ? `Edition ${number}` : 'The current edition';
  });
}
