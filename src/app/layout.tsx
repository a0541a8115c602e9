import { NavLink, Navigate, Outlet, useLocation, useNavigate, useParams } from 'react-router';
import { BrandMark } from '../components/brand';
import { Loading } from '../components/status';
import { useSession, useSignOut } from '../features/session/api/session';
import { ForbiddenPage } from './error-pages';
import { navFor } from './nav';
import { GuardedOutlet } from './page-access';

const ROLE_NAMES = { lead: 'Classification lead', classifier: 'Classifier', researcher: 'Researcher' } as const;

/** Requires a session; otherwise sends the visitor to sign in and back. */
export function RequireSession() {
  const session = useSession();
  const location = useLocation();
  if (session.isPending) return <Loading />;
  if (!session.data) return <Navigate to={`/sign-in?next=${encodeURIComponent(location.pathname + location.search)}`} replace />;
  return <Outlet />;
}

/** Sends a signed-in user to their first federation. */
export function HomeRedirect() {
  const session = useSession();
  const first = session.data?.memberships[0];
  if (!first && session.data?.user.isOwner) return <Navigate to="/owner" replace />;
  if (!first) {
    return (
      <main className="mx-auto max-w-xl p-8">
        <h1>No federation yet</h1>
        <p className="mt-2 text-muted">Your account is not a member of any federation. Ask your federation's classification lead for an invitation.</p>
      </main>
    );
  }
  const landing = first.role === 'classifier' ? 'me' : '';
  return <Navigate to={`/f/${first.federation.slug}/${landing}`} replace />;
}

export function FederationLayout() {
  const { federation } = useParams();
  const session = useSession();
  const signOut = useSignOut();
  const navigate = useNavigate();
  const memberships = session.data?.memberships ?? [];
  const membership = memberships.find((m) => m.federation.slug === federation);
  if (!membership) return <ForbiddenPage />;
  const base = `/f/${membership.federation.slug}`;

  return (
    <div className="min-h-screen">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-card focus:p-2">
        Skip to content
      </a>
      <header className="border-b border-line bg-card">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-3 px-4 py-3">
          <NavLink to={base} className="flex items-center gap-2 font-bold tracking-tight">
            <BrandMark size={32} />
            <span className="text-lg">Panelwise</span>
          </NavLink>
          <div className="flex items-center gap-2">
            <label htmlFor="federation-switcher" className="sr-only">
              Federation
            </label>
            <select
              id="federation-switcher"
              className="input min-h-10 py-1.5 text-sm"
              value={membership.federation.slug}
              onChange={(e) => navigate(`/f/${e.target.value}`)}
            >
              {memberships.map((m) => (
                <option key={m.federation.slug} value={m.federation.slug}>
                  {m.federation.name}
                </option>
              ))}
            </select>
            <span className="rounded-full bg-harbour-soft px-2.5 py-1 text-xs font-semibold text-harbour">{ROLE_NAMES[membership.role]}</span>
          </div>
          <div className="ml-auto flex items-center gap-3 text-sm">
            <span className="text-muted">{session.data?.user.displayName}</span>
            <button
              type="button"
              className="btn btn-quiet min-h-10 py-1.5"
              onClick={() => signOut.mutate(undefined, { onSuccess: () => navigate('/sign-in', { replace: true }) })}
            >
              Sign out
            </button>
          </div>
        </div>
        <nav aria-label="Federation" className="mx-auto max-w-7xl overflow-x-auto px-4">
          <ul className="flex gap-1">
            {navFor(membership.role).map((item) => (
              <li key={item.path}>
                <NavLink
                  to={item.path ? `${base}/${item.path}` : base}
                  end={item.path === ''}
                  className={({ isActive }) =>
                    `block whitespace-nowrap border-b-[3px] px-3 py-2.5 text-sm font-semibold ${isActive ? 'border-amber text-ink' : 'border-transparent text-muted hover:text-ink'}`
                  }
                >
                  {item.label}
                </NavLink>
              </li>
            ))}
          </ul>
        </nav>
      </header>
      <main id="main" className="mx-auto max-w-7xl px-4 py-6">
        <GuardedOutlet membership={membership} />
      </main>
    </div>
  );
}
