import { useCurrentFederation } from '../../../lib/use-federation';
import { useMyAgreement } from '../api/get-my-agreement';
import { ClassifierFigures } from './classifier-figures';
import { PageFrame, QueryState } from './page-frame';
import { useAnalyticsFilters } from './use-analytics-filters';

/** A classifier's own page: their figures only, and the federation's spread without names. */
export function MyAgreementPage() {
  const { federation } = useCurrentFederation();
  const filters = useAnalyticsFilters();
  const query = useMyAgreement(federation.slug, filters.filters);
  return (
    <PageFrame
      title="My agreement"
      intro="How your ratings compare with the other members of your panels. Use it to prepare for calibration; it says nothing about whether any athlete’s class is right."
      federation={federation.slug}
      filters={filters}
    >
      <QueryState query={query}>{(detail) => <ClassifierFigures detail={detail} who="you" fileStem="my-agreement" />}</QueryState>
    </PageFrame>
  );
}
