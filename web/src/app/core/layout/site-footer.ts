import { ChangeDetectionStrategy, Component } from '@angular/core';
import { RouterLink } from '@angular/router';
import { CAUTIONS } from '@shared/engine';

@Component({
  selector: 'sv-site-footer',
  imports: [RouterLink],
  templateUrl: './site-footer.html',
  styleUrl: './site-footer.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SiteFooter {
  protected readonly fieldSafety = CAUTIONS.fieldSafety;
  protected readonly identification = CAUTIONS.identification;
  protected readonly use = CAUTIONS.use;
}
