import { Link, useLocation, useParams } from 'react-router';
import { useCurrentFederation } from '../../../lib/use-federation';
import { useClassifier } from '../api/get-classifier';
import { ClassifierFigures } from './classifier-figures';
import { PageFrame, QueryState } from './page-frame';
import { useAnalyticsFilters } from './use-analytics-filters';

export function ClassifierPage() {
  const { federation } = useCurrentFederation();
  const { code = '' } = useParams();
  const filters = useAnalyticsFilters();
  const { search } = useLocation();
  const query = useClassifier(federation.slug, filters.filters, code);
  return (
    <PageFrame
      title={`Classifier ${code}${query.data?.name ? ` · ${query.data.name}` : ''}`}
      intro={
        <>
          Their classes against the panel’s, their bias over time, the class boundaries where they split from the panel most, and the change
          detector.{' '}
          <Link to={`..${search}`} relative="path" className="text-harbour underline">
            All classifiers
          </Link>
        </>
      }
      federation={federation.slug}
      filters={filters}
    >
      <QueryState query={query}>
        {(detail) => <ClassifierFigures detail={detail} who={code} fileStem={`${federation.slug}-${code}`} />}
      </QueryState>
    </PageFrame>
  );
}
