import { type Routes } from '@angular/router';

export const routes: Routes = [
  { path: '', title: 'Sylvasift', loadComponent: () => import('./features/home/home-page') },
  { path: 'about', title: 'About Sylvasift · Sylvasift', loadComponent: () => import('./features/home/about-page') },
  { path: '**', title: 'Page not found · Sylvasift', loadComponent: () => import('./core/layout/not-found-page') },
];
