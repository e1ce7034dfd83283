import { ChangeDetectionStrategy, Component } from '@angular/core';
import { CAUTIONS } from '@shared/engine';

@Component({
  selector: 'sv-about-page',
  templateUrl: './about-page.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class AboutPage {
  protected readonly cautions = [
    { title: 'Field safety', text: CAUTIONS.fieldSafety },
    { title: 'A suggestion, not a determination', text: CAUTIONS.identification },
    { title: 'Not advice on using plants', text: CAUTIONS.use },
  ];
}
