import { useEffect, useLayoutEffect } from 'react';
import { useLocation, useParams } from 'react-router';
import { useSession } from '../features/session/api/session';
import { NAV_ITEMS } from './nav';

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

function useFederationName(): string | null {
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

/** Names of the federation's pages that are not in the navigation. */
const HIDDEN_PAGE_TITLES: Record<string, string> = { outbox: 'Outbox', help: 'Help' };

/** The title a page below /f/:federation gets when it sets none itself: its navigation label. */
export function fallbackPageTitle(rest: string): string | null {
  const [first = '', second] = rest.split('/').filter(Boolean);
  if (first === 'classifiers' && second) return `Classifier ${decodeURIComponent(second)}`;
  return NAV_ITEMS.find((item) => item.path === first)?.label ?? HIDDEN_PAGE_TITLES[first] ?? null;
}

/**
 * The federation layout's default title from the navigation, set before the page's own
 * usePageTitle (layout effects run before effects), so a page without one still gets a distinct
 * title and a page with one wins.
 */
export function useFallbackTitle(rest: string): void {
  const federationName = useFederationName();
  const { pathname } = useLocation();
  useLayoutEffect(() => {
    document.title = composeTitle(fallbackPageTitle(rest), federationName);
  }, [rest, federationName, pathname]);
}
