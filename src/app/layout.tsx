import { useEffect, useId, useState } from 'react';
import { NavLink, Navigate, Outlet, useLocation, useNavigate, useParams } from 'react-router';
import { BrandMark } from '../components/brand';
import { Loading } from '../components/status';
import { useSession, useSignOut } from '../lib/session';
import { ForbiddenPage } from '../components/error-pages';
import { useFilterSearch } from '../lib/filter-search';
import { navFor } from './nav';
import { GuardedOutlet } from './page-access';
import { usePageTitle } from '../lib/page-title';
import { useFallbackTitle } from './page-title';

const ROLE_NAMES = { lead: 'Classification lead', classifier: 'Classifier', researcher: 'Researcher' } as const;

/** Requires a session; otherwise sends the visitor to sign in and back. */
export function RequireSession() {
  const session = useSession();
  const location = useLocation();
  if (session.isPending) return <Loading />;
  if (!session.data) return <Navigate to={`/sign-in?next=${encodeURIComponent(location.pathname + location.search)}`} replace />;
  return <Outlet />;
}

function NoFederation() {
  usePageTitle('No federation yet');
  return (
    <main className="mx-auto max-w-xl p-8">
      <h1>No federation yet</h1>
      <p className="mt-2 text-muted">
        Your account is not a member of any federation. Ask your federation's classification lead for an invitation.
      </p>
    </main>
  );
}

/** Sends a signed-in user to their first federation. */
export function HomeRedirect() {
  const session = useSession();
  const first = session.data?.memberships[0];
  if (!first && session.data?.user.isOwner) return <Navigate to="/owner" replace />;
  if (!first) return <NoFederation />;
  const landing = first.role === 'classifier' ? 'me' : '';
  return <Navigate to={`/f/${first.federation.slug}/${landing}`} replace />;
}

export function FederationLayout() {
  const { federation } = useParams();
  const session = useSession();
  const signOut = useSignOut();
  const navigate = useNavigate();
  const { pathname } = useLocation();
  const filters = useFilterSearch();
  const [menuOpen, setMenuOpen] = useState(false);
  const menuId = useId();
  const memberships = session.data?.memberships ?? [];
  const membership = memberships.find((m) => m.federation.slug === federation);
  const base = `/f/${membership?.federation.slug ?? federation}`;
  useFallbackTitle(pathname.startsWith(base) ? pathname.slice(base.length) : '');
  // The phone menu closes once a page is chosen.
  useEffect(() => setMenuOpen(false), [pathname]);
  if (!membership) return <ForbiddenPage />;

  const signOutButton = (
    <button
      type="button"
      className="btn btn-quiet min-h-10 py-1.5"
      onClick={() => signOut.mutate(undefined, { onSuccess: () => void navigate('/sign-in', { replace: true }) })}
    >
      Sign out
    </button>
  );

  return (
    <div className="min-h-screen">
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-card focus:p-2"
      >
        Skip to content
      </a>
      <header className="border-b border-line bg-card">
        <div className="mx-auto flex max-w-7xl items-center gap-x-4 gap-y-3 px-4 py-3 md:flex-wrap">
          <NavLink to={`${base}${filters}`} className="flex shrink-0 items-center gap-2 font-bold tracking-tight">
            <BrandMark size={32} />
            <span className="text-lg">Panelwise</span>
          </NavLink>
          <div className="flex min-w-0 items-center gap-2">
            <label htmlFor="federation-switcher" className="sr-only">
              Federation
            </label>
            <select
              id="federation-switcher"
              className="input min-h-10 w-full min-w-0 max-w-[16rem] truncate py-1.5 text-sm md:w-auto md:max-w-xs"
              value={membership.federation.slug}
              onChange={(e) => navigate(`/f/${e.target.value}`)}
            >
              {memberships.map((m) => (
                <option key={m.federation.slug} value={m.federation.slug}>
                  {m.federation.name}
                </option>
              ))}
            </select>
            <span className="hidden shrink-0 rounded-full bg-harbour-soft px-2.5 py-1 text-xs font-semibold text-harbour md:inline">
              {ROLE_NAMES[membership.role]}
            </span>
          </div>
          <div className="ml-auto hidden items-center gap-3 text-sm md:flex">
            <span className="text-muted">{session.data?.user.displayName}</span>
            {signOutButton}
          </div>
          <button
            type="button"
            className="btn btn-quiet ml-auto min-h-10 shrink-0 px-3 py-1.5 md:hidden"
            aria-expanded={menuOpen}
            aria-controls={menuId}
            onClick={() => setMenuOpen((v) => !v)}
          >
            <svg width="18" height="18" viewBox="0 0 18 18" aria-hidden="true">
              {menuOpen ? (
                <path d="M4 4l10 10M14 4L4 14" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
              ) : (
                <path d="M2 4h14M2 9h14M2 14h14" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
              )}
            </svg>
            Menu
          </button>
        </div>
        <div id={menuId} className={`${menuOpen ? 'block' : 'hidden'} mx-auto max-w-7xl md:block`}>
          <nav aria-label="Federation" className="px-4 md:overflow-x-auto">
            <ul className="flex flex-col gap-0.5 pb-2 md:flex-row md:gap-1 md:pb-0">
              {navFor(membership.role).map((item) => (
                <li key={item.path}>
                  <NavLink
                    to={`${item.path ? `${base}/${item.path}` : base}${filters}`}
                    end={item.path === ''}
                    className={({ isActive }) =>
                      `block whitespace-nowrap border-l-[3px] px-3 py-2.5 text-sm font-semibold md:border-b-[3px] md:border-l-0 ${isActive ? 'border-amber text-ink' : 'border-transparent text-muted hover:text-ink'}`
                    }
                  >
                    {item.label}
                  </NavLink>
                </li>
              ))}
            </ul>
          </nav>
          <div className="flex flex-wrap items-center gap-3 border-t border-line px-4 py-3 text-sm md:hidden">
            <span className="rounded-full bg-harbour-soft px-2.5 py-1 text-xs font-semibold text-harbour">
              {ROLE_NAMES[membership.role]}
            </span>
            <span className="mr-auto text-muted">{session.data?.user.displayName}</span>
            {signOutButton}
          </div>
        </div>
      </header>
      <main id="main" className="mx-auto max-w-7xl px-4 py-6">
        <GuardedOutlet membership={membership} />
      </main>
    </div>
  );
}
