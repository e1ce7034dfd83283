import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { RouterLink } from '@angular/router';
import { MatCard, MatCardActions, MatCardAvatar, MatCardContent, MatCardHeader, MatCardTitle } from '@angular/material/card';
import { MatAnchor } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { HealthService } from '../../core/api/health-service';
import { AuthService } from '../../core/auth/auth-service';
import { ADMIN_ROLES } from '../../core/auth/roles';

@Component({
  selector: 'sv-home-page',
  imports: [RouterLink, MatCard, MatCardAvatar, MatCardHeader, MatCardTitle, MatCardContent, MatCardActions, MatAnchor, MatIcon, MatProgressBar],
  templateUrl: './home-page.html',
  styleUrl: './home-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class HomePage {
  private readonly healthService = inject(HealthService);
  readonly #auth = inject(AuthService);
  protected readonly health = this.healthService.healthResource();
  protected readonly isAdmin = computed(() => ADMIN_ROLES.includes(this.#auth.me()?.role ?? ''));
}
