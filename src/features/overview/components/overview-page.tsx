import { useCurrentFederation } from '../../../app/use-federation';
import { Caution } from '../../../components/caution';
import { SummaryCounts } from './summary-counts';

export function OverviewPage() {
  const { federation } = useCurrentFederation();
  return (
    <div className="space-y-6">
      <div>
        <h1>{federation.name}</h1>
        <p className="text-muted">Overview of the classification programme's panel decisions.</p>
      </div>
      <SummaryCounts federation={federation.slug} />
      <Caution />
    </div>
  );
}
