import { Link, isRouteErrorResponse, useRouteError } from 'react-router';
import { usePageTitle } from '../lib/page-title';

function Message({ title, children }: { title: string; children: React.ReactNode }) {
  usePageTitle(title);
  return (
    <main className="mx-auto max-w-xl px-4 py-16">
      <h1>{title}</h1>
      <div className="mt-3 space-y-3 text-muted">{children}</div>
      <p className="mt-6">
        <Link to="/" className="btn btn-quiet">
          Back to Panelwise
        </Link>
      </p>
    </main>
  );
}

export function ForbiddenPage() {
  return (
    <Message title="Not available to you">
      <p>
        Your account does not have access to this page or federation. If you think it should, ask your federation's classification lead.
      </p>
    </Message>
  );
}

export function ExpiredLinkPage() {
  return (
    <Message title="This link has expired">
      <p>Links sent by e-mail work once and only for a limited time. Ask for a new one.</p>
    </Message>
  );
}

export function NotFoundPage() {
  return (
    <Message title="Page not found">
      <p>There is no page at this address.</p>
    </Message>
  );
}

export function RouteErrorPage() {
  const error = useRouteError();
  if (isRouteErrorResponse(error) && error.status === 404) return <NotFoundPage />;
  return (
    <Message title="Something went wrong">
      <p>The page could not be shown. Reload it, or go back and try again.</p>
    </Message>
  );
}
