import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatTab, MatTabContent, MatTabGroup } from '@angular/material/tabs';
import { AdminPeople } from './admin-people';
import { AdminKeys } from './admin-keys';
import { AdminBackups } from './admin-backups';

/** Admin: people and their roles, every partner key, backups. */
@Component({
  selector: 'sv-admin-page',
  imports: [MatTabGroup, MatTab, MatTabContent, AdminPeople, AdminKeys, AdminBackups],
  template: `
    <h1>Admin</h1>
    <p class="intro">Invite people and give them roles, revoke any partner key, and back up or restore this Sylvasift's data.</p>
    <mat-tab-group mat-stretch-tabs="false" animationDuration="0ms">
      <mat-tab label="People"
        ><ng-template matTabContent><sv-admin-people /></ng-template
      ></mat-tab>
      <mat-tab label="Partner keys"
        ><ng-template matTabContent><sv-admin-keys /></ng-template
      ></mat-tab>
      <mat-tab label="Backups"
        ><ng-template matTabContent><sv-admin-backups /></ng-template
      ></mat-tab>
    </mat-tab-group>
  `,
  styles: `
    :host {
      display: block;
      max-width: 1100px;
    }
    h1 {
      margin: 8px 0 4px;
      font: var(--mat-sys-headline-small);
    }
    .intro {
      max-width: 70ch;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class AdminPage {}
