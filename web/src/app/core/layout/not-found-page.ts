import { ChangeDetectionStrategy, Component } from '@angular/core';
import { RouterLink } from '@angular/router';
import { MatAnchor } from '@angular/material/button';

@Component({
  selector: 'sv-not-found-page',
  imports: [RouterLink, MatAnchor],
  template: `
    <h1>Page not found</h1>
    <p>There is no page at this address. It may have moved, or the link may be mistyped.</p>
    <a mat-flat-button routerLink="/">Go to the home page</a>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class NotFoundPage {}
