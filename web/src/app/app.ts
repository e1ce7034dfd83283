import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { RouterOutlet } from '@angular/router';
import { TopBar } from './core/layout/top-bar';
import { SiteFooter } from './core/layout/site-footer';
import { AppUpdates } from './core/offline/app-updates';
import { EditionPrefetch } from './core/offline/edition-prefetch';

@Component({
  selector: 'sv-root',
  imports: [RouterOutlet, TopBar, SiteFooter],
  templateUrl: './app.html',
  styleUrl: './app.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class App {
  constructor() {
    inject(AppUpdates).start();
    inject(EditionPrefetch).start();
  }
}
