import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { RouterLink } from '@angular/router';
import { CAUTIONS } from '@shared/engine';
import { PageCautions } from './page-cautions';

@Component({
  selector: 'sv-site-footer',
  imports: [RouterLink],
  templateUrl: './site-footer.html',
  styleUrl: './site-footer.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SiteFooter {
  protected readonly pageCautions = inject(PageCautions);
  protected readonly fieldSafety = CAUTIONS.fieldSafety;
  protected readonly identification = CAUTIONS.identification;
  protected readonly use = CAUTIONS.use;
}
