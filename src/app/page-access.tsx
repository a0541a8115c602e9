import { Outlet, useLocation, useParams } from 'react-router';
import type { Role } from '../../shared/schemas/common';
import type { MembershipView } from '../../shared/schemas/session';
import { ForbiddenPage } from '../components/error-pages';
import { NAV_ITEMS } from './nav';

/** Pages below /f/:federation that are not in the navigation but are kept to some roles. */
const HIDDEN_PAGE_ROLES: Record<string, readonly Role[]> = {
  outbox: ['lead'],
};

/**
 * Whether the member's role may open the page at `rest` (the path below /f/:federation): the
 * roles of its navigation entry, and a classifier may open their own classifier page
 * (classifiers/<their code>) only. The server checks every API call anyway; this shows the 403
 * page instead of a page of errors.
 */
export function pageAllowed(membership: MembershipView, rest: string): boolean {
  const [first = '', second] = rest.split('/').filter(Boolean);
  if (membership.role === 'classifier' && first === 'classifiers' && second !== undefined) {
    return membership.classifierCode !== null && decodeURIComponent(second) === membership.classifierCode;
  }
  const roles = NAV_ITEMS.find((item) => item.path === first)?.roles ?? HIDDEN_PAGE_ROLES[first];
  return !roles || roles.includes(membership.role);
}

/** The federation's page, or the 403 page when the member's role may not open it. */
export function GuardedOutlet({ membership }: { membership: MembershipView }) {
  const { federation = '' } = useParams();
  const { pathname } = useLocation();
  const base = `/f/${federation}`;
  const rest = pathname.startsWith(base) ? pathname.slice(base.length) : '';
  return pageAllowed(membership, rest) ? <Outlet /> : <ForbiddenPage />;
}
