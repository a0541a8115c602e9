import type { Role } from '../../shared/schemas/common';

export interface NavItem {
  /** Path below /f/:federation ('' is the overview). */
  path: string;
  label: string;
  roles: readonly Role[];
}

/**
 * The navigation of a federation, in order. Each page says which roles may use it; the server
 * checks the same on every API route, so this only keeps people from dead ends.
 */
export const NAV_ITEMS: NavItem[] = [
  { path: '', label: 'Overview', roles: ['lead', 'classifier', 'researcher'] },
  { path: 'me', label: 'My agreement', roles: ['classifier'] },
  { path: 'classifiers', label: 'Classifiers', roles: ['lead'] },
  { path: 'pairs', label: 'Pairs', roles: ['lead'] },
  { path: 'boundaries', label: 'Class boundaries', roles: ['lead', 'classifier', 'researcher'] },
  { path: 'drift', label: 'Drift', roles: ['lead', 'classifier', 'researcher'] },
  { path: 'flags', label: 'Calibration flags', roles: ['lead'] },
  { path: 'exercises', label: 'Exercises', roles: ['lead', 'classifier'] },
  { path: 'members', label: 'Members', roles: ['lead'] },
  { path: 'exports', label: 'Research export', roles: ['lead', 'researcher'] },
  { path: 'imports', label: 'Imports', roles: ['lead'] },
  { path: 'help', label: 'Help', roles: ['lead', 'classifier', 'researcher'] },
];

export function navFor(role: Role): NavItem[] {
  return NAV_ITEMS.filter((item) => item.roles.includes(role));
}
