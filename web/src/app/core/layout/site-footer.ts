import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { RouterLink } from '@angular/router';
import { FIELD_SAFETY_CAUTION, IDENTIFICATION_CAUTION, USE_CAUTION } from './cautions';
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
  protected readonly fieldSafety = FIELD_SAFETY_CAUTION;
  protected readonly identification = IDENTIFICATION_CAUTION;
  protected readonly use = USE_CAUTION;
}
