import type { Routes } from '@angular/router';

/** The Matrix desk's pages, lazy-loaded under `/desk` behind the desk guard. */
export const DESK_ROUTES: Routes = [
  { path: '', title: 'Matrix desk · Sylvasift', loadComponent: () => import('./matrix-grid-page') },
  { path: 'editions', title: 'Editions · Matrix desk · Sylvasift', loadComponent: () => import('./editions-page') },
  { path: 'changes', title: 'Change log · Matrix desk · Sylvasift', loadComponent: () => import('./change-log-page') },
];
