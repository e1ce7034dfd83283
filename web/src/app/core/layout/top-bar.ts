import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { RouterLink, RouterLinkActive } from '@angular/router';
import { MatToolbar } from '@angular/material/toolbar';
import { MatIcon } from '@angular/material/icon';
import { MatAnchor } from '@angular/material/button';
import { AuthService } from '../auth/auth-service';
import { NAV_LINKS } from './nav-links';

@Component({
  selector: 'sv-top-bar',
  imports: [RouterLink, RouterLinkActive, MatToolbar, MatIcon, MatAnchor],
  templateUrl: './top-bar.html',
  styleUrl: './top-bar.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TopBar {
  protected readonly auth = inject(AuthService);
  /** the links for whoever is signed in: role-bound ones only once the account is known */
  protected readonly links = computed(() => {
    const role = this.auth.me()?.role;
    return NAV_LINKS.filter((link) => !link.roles || (role !== undefined && link.roles.includes(role)));
  });
}
