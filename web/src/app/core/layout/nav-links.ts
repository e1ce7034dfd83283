import { ADMIN_ROLES, CURATOR_ROLES, KEY_HOLDER_ROLES } from '../auth/roles';

/** One entry of the main navigation; features add theirs here as their pages land. */
export interface NavLink {
  path: string;
  label: string;
  icon: string;
  /** shown only to these roles (the server still checks every request); absent: shown to everyone */
  roles?: readonly string[];
}

export const NAV_LINKS: readonly NavLink[] = Object.freeze([
  { path: '/sift', label: 'Sift', icon: 'filter_alt' },
  { path: '/study', label: 'Study', icon: 'school' },
  { path: '/review', label: 'Second look', icon: 'rate_review', roles: ['reviewer', 'admin'] },
  { path: '/desk', label: 'Matrix desk', icon: 'table_view', roles: CURATOR_ROLES },
  { path: '/keys', label: 'Partner keys', icon: 'key', roles: KEY_HOLDER_ROLES },
  { path: '/admin', label: 'Admin', icon: 'admin_panel_settings', roles: ADMIN_ROLES },
  { path: '/', label: 'Home', icon: 'park' },
  { path: '/about', label: 'About', icon: 'info' },
]);
