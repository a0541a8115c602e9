import { useLayoutEffect } from 'react';
import { useLocation } from 'react-router';
import { composeTitle, useFederationName } from '../lib/page-title';
import { NAV_ITEMS } from './nav';

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
