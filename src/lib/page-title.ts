import { useEffect } from 'react';
import { useParams } from 'react-router';
import { useSession } from './session';

export const APP_NAME = 'Panelwise';

/** "Kestrel Coast Wheelchair Basketball Federation" → "Kestrel Coast": the tab has little room. */
export function shortFederationName(name: string): string {
  const short = name.replace(/\s+(wheelchair\s+basketball\s+)?(federation|association)$/i, '').trim();
  return short || name;
}

/** "Pairs · Kestrel Coast · Panelwise"; "Sign in · Panelwise" outside a federation. */
export function composeTitle(page: string | null, federationName?: string | null): string {
  return [page, federationName ? shortFederationName(federationName) : null, APP_NAME].filter(Boolean).join(' · ');
}

export function useFederationName(): string | null {
  const { federation } = useParams();
  const session = useSession();
  if (!federation) return null;
  return session.data?.memberships.find((m) => m.federation.slug === federation)?.federation.name ?? null;
}

/**
 * Sets the document title of the page: call it once at the top of every page component with the
 * page's name (dashboard pages get it from PageFrame's title). Inside a federation the
 * federation's short name is added.
 */
export function usePageTitle(title: string): void {
  const federationName = useFederationName();
  useEffect(() => {
    document.title = composeTitle(title, federationName);
  }, [title, federationName]);
}
