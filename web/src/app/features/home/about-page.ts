import { ChangeDetectionStrategy, Component } from '@angular/core';
import { FIELD_SAFETY_CAUTION, IDENTIFICATION_CAUTION, USE_CAUTION } from '../../core/layout/cautions';

@Component({
  selector: 'sv-about-page',
  templateUrl: './about-page.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class AboutPage {
  protected readonly cautions = [
    { title: 'Field safety', text: FIELD_SAFETY_CAUTION },
    { title: 'A suggestion, not a determination', text: IDENTIFICATION_CAUTION },
    { title: 'Not advice on using plants', text: USE_CAUTION },
  ];
}
