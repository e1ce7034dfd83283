import { ChangeDetectionStrategy, Component } from '@angular/core';
import { RouterLink, RouterLinkActive } from '@angular/router';

/** The links between the Matrix desk's pages. */
@Component({
  selector: 'sv-desk-tabs',
  imports: [RouterLink, RouterLinkActive],
  template: `
    <nav class="desk-tabs" aria-label="Matrix desk">
      <a routerLink="/desk" routerLinkActive="active" [routerLinkActiveOptions]="{ exact: true }" ariaCurrentWhenActive="page">Working matrix</a>
      <a routerLink="/desk/editions" routerLinkActive="active" ariaCurrentWhenActive="page">Editions</a>
      <a routerLink="/desk/changes" routerLinkActive="active" ariaCurrentWhenActive="page">Change log</a>
    </nav>
  `,
  styles: `
    .desk-tabs {
      display: flex;
      flex-wrap: wrap;
      gap: 4px 16px;
      margin: 4px 0 12px;
      font: var(--mat-sys-label-large);
    }
    a {
      padding: 6px 2px;
      border-bottom: 2px solid transparent;
      color: var(--mat-sys-on-surface);
    }
    a.active {
      border-bottom-color: var(--mat-sys-primary);
      font-weight: 700;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeskTabs {}
