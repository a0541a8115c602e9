import { QueryState } from '../../../components/query-state';
import { formatDate, formatInteger } from '../../../lib/format';
import { useSummary } from '../api/get-summary';

/** The federation's counts: what the figures on the page rest on. */
export function SummaryCounts({ federation }: { federation: string }) {
  const summary = useSummary(federation);
  if (summary.isPending || summary.isError)
    return (
      <QueryState query={summary} what="The federation’s counts">
        {() => null}
      </QueryState>
    );
  const { counts, firstAssessment, lastAssessment } = summary.data;
  const items: [string, number][] = [
    ['Assessments', counts.assessments],
    ['Ratings', counts.ratings],
    ['Athletes', counts.athletes],
    ['Classifiers', counts.classifiers],
    ['Events', counts.events],
  ];
  return (
    <section aria-labelledby="counts-title">
      <h2 id="counts-title" className="sr-only">
        Counts
      </h2>
      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-5">
        {items.map(([label, value]) => (
          <div key={label} className="card py-4">
            <dt className="text-sm text-muted">{label}</dt>
            <dd className="stat-value" data-testid={`count-${label.toLowerCase()}`}>
              {formatInteger(value)}
            </dd>
          </div>
        ))}
      </dl>
      {firstAssessment ? (
        <p className="mt-2 text-sm text-muted">
          Assessments from {formatDate(firstAssessment)} to {formatDate(lastAssessment)}.
        </p>
      ) : (
        <p className="mt-2 text-sm text-muted">No assessments yet: import panel decisions to begin.</p>
      )}
    </section>
  );
}
