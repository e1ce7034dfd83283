import { type Routes } from '@angular/router';
import { unsavedChangesGuard } from './core/navigation/unsaved-changes';
import { authGuard } from './core/auth/auth-guard';
import { roleGuard } from './core/auth/role-guard';
import { ADMIN_ROLES, CURATOR_ROLES, KEY_HOLDER_ROLES } from './core/auth/roles';

export const routes: Routes = [
  { path: '', title: 'Sylvasift', loadComponent: () => import('./features/home/home-page') },
  { path: 'sift', title: 'Sift a tree · Sylvasift', loadComponent: () => import('./features/sift/sift-page') },
  { path: 'species/:id', title: 'Species · Sylvasift', loadComponent: () => import('./features/species/species-page') },
  { path: 'sign-in', title: 'Sign in · Sylvasift', loadComponent: () => import('./features/account/sign-in-page') },
  { path: 'sign-up', title: 'Create an account · Sylvasift', loadComponent: () => import('./features/account/sign-up-page') },
  { path: 'forgot-password', title: 'Forgot your password · Sylvasift', loadComponent: () => import('./features/account/forgot-password-page') },
  { path: 'account/reset-password/:token', title: 'Choose a new password · Sylvasift', loadComponent: () => import('./features/account/reset-password-page') },
  { path: 'account/invitation/:token', title: 'Accept your invitation · Sylvasift', loadComponent: () => import('./features/account/invitation-page') },
  { path: 'account', title: 'Your account · Sylvasift', canActivate: [authGuard], loadComponent: () => import('./features/account/account-page') },
  { path: 'study', title: 'Study sets · Sylvasift', canActivate: [authGuard], loadComponent: () => import('./features/study/study-list-page') },
  {
    path: 'study/new',
    title: 'New study set · Sylvasift',
    canActivate: [authGuard],
    canDeactivate: [unsavedChangesGuard],
    loadComponent: () => import('./features/study/study-set-editor'),
  },
  { path: 'study/:id', title: 'Study set · Sylvasift', canActivate: [authGuard], loadComponent: () => import('./features/study/study-set-page') },
  {
    path: 'study/:id/edit',
    title: 'Edit study set · Sylvasift',
    canActivate: [authGuard],
    canDeactivate: [unsavedChangesGuard],
    loadComponent: () => import('./features/study/study-set-editor'),
  },
  { path: 'study/:id/sheet', title: 'Study sheet · Sylvasift', canActivate: [authGuard], loadComponent: () => import('./features/study/study-sheet-page') },
  { path: 'study/:id/drill', title: 'Drills · Sylvasift', canActivate: [authGuard], loadComponent: () => import('./features/study/drill-page') },
  { path: 'review', title: 'Second look · Sylvasift', canActivate: [authGuard], loadComponent: () => import('./features/review/review-queue-page') },
  { path: 'review/queries/:id', redirectTo: '/review/:id' },
  { path: 'review/:id', title: 'Query · Sylvasift', canActivate: [authGuard], loadComponent: () => import('./features/review/query-page') },
  { path: 'desk', canActivate: [roleGuard(CURATOR_ROLES)], loadChildren: () => import('./features/desk/desk-routes').then((m) => m.DESK_ROUTES) },
  { path: 'keys', title: 'Partner keys · Sylvasift', canActivate: [roleGuard(KEY_HOLDER_ROLES)], loadComponent: () => import('./features/keys/keys-page') },
  { path: 'admin', title: 'Admin · Sylvasift', canActivate: [roleGuard(ADMIN_ROLES)], loadComponent: () => import('./features/admin/admin-page') },
  { path: 'about', title: 'About Sylvasift · Sylvasift', loadComponent: () => import('./features/home/about-page') },
  { path: '**', title: 'Page not found · Sylvasift', loadComponent: () => import('./core/layout/not-found-page') },
];
