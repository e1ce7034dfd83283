/** One entry of the main navigation; features add theirs here as their pages land. */
export interface NavLink {
  path: string;
  label: string;
  icon: string;
}

export const NAV_LINKS: readonly NavLink[] = Object.freeze([
  { path: '/sift', label: 'Sift', icon: 'filter_alt' },
  { path: '/study', label: 'Study', icon: 'school' },
  { path: '/', label: 'Home', icon: 'park' },
  { path: '/about', label: 'About', icon: 'info' },
]);
