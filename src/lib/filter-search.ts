import { useLocation } from 'react-router';
import { ANALYTICS_FILTER_KEYS } from '../../shared/schemas/analytics';

/**
 * The filters of the current address as a search string ("?season=2024&kind=initial"), without
 * a page's own parameters (a chosen pair, say). Links between the federation's pages append it,
 * so a season chosen on the overview still applies on Classifiers.
 */
export function filterSearch(search: string): string {
  const current = new URLSearchParams(search);
  const kept = new URLSearchParams();
  for (const key of ANALYTICS_FILTER_KEYS) {
    const value = current.get(key);
    if (value !== null && value !== '') kept.set(key, value);
  }
  const text = kept.toString();
  return text ? `?${text}` : '';
}

/** filterSearch of the current location. */
export function useFilterSearch(): string {
  return filterSearch(useLocation().search);
}
