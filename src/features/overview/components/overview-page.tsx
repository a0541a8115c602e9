import { Link } from 'react-router';
import { FLAG_RULE_LABELS, FLAG_STATUS_LABELS, type Overview } from '../../../../shared/schemas/analytics';
import { useFilterSearch } from '../../../app/filter-search';
import { useCurrentFederation } from '../../../app/use-federation';
import { TrendChart } from '../../dashboards/components/charts';
import { integer, num, pct } from '../../dashboards/components/format';
import { PageFrame, QueryState } from '../../dashboards/components/page-frame';
import { useAnalyticsFilters } from '../../dashboards/components/use-analytics-filters';
import { useOverview } from '../api/get-overview';
import { SummaryCounts } from './summary-counts';

const NOTE_WORDS = { reliable: 'reliable (α ≥ 0.800)', tentative: 'tentative conclusions only (0.667 ≤ α < 0.800)', unreliable: 'not to be relied on (α < 0.667)' } as const;

function Coefficient({ heading, stat, testId }: { heading: string; stat: Overview['alpha'] | Overview['fleissKappa']; testId: string }) {
  return (
    <div className="card space-y-1">
      <h3 className="text-sm font-semibold text-muted">{heading}</h3>
      <p className="stat-value" data-testid={testId}>
        {num(stat.value, 3)}
      </p>
      <p className="text-sm">
        {stat.ci95 ? (
          <>
            95 % CI {num(stat.ci95[0], 3)} to {num(stat.ci95[1], 3)}
            <span className="text-muted"> ({stat.ciMethod === 'bootstrap-percentile' ? 'bootstrap percentile' : stat.ciMethod === 'wald-null-se' ? 'Wald, null SE' : stat.ciMethod})</span>
          </>
        ) : (
          <span className="text-muted">{stat.reason ?? 'no interval'}</span>
        )}
      </p>
      <p className="text-sm">
        Band: <strong>{stat.label ?? '—'}</strong> <span className="text-muted">(Landis &amp; Koch 1977)</span>
      </p>
      {'note' in stat && stat.note ? <p className="text-sm text-muted">Krippendorff (2004): {NOTE_WORDS[stat.note]}</p> : null}
    </div>
  );
}

export function OverviewPage() {
  const { federation, role } = useCurrentFederation();
  const filters = useAnalyticsFilters();
  const overview = useOverview(federation.slug, filters.filters);
  const filterSearch = useFilterSearch();
  return (
    <PageFrame
      title={federation.name}
      documentTitle="Overview"
      intro="How consistently the federation’s panels classify: the headline reliability, agreement, its trend by quarter and the open calibration flags."
      federation={federation.slug}
      filters={filters}
    >
      <SummaryCounts federation={federation.slug} />
      <QueryState query={overview}>
        {(o) => (
          <div className="space-y-6">
            <section aria-labelledby="reliability-title" className="space-y-3">
              <h2 id="reliability-title">Reliability of the panels</h2>
              <div className="grid gap-3 md:grid-cols-2">
                <Coefficient heading={o.alpha.name} stat={o.alpha} testId="alpha-value" />
                <Coefficient heading={o.fleissKappa.name} stat={o.fleissKappa} testId="fleiss-value" />
              </div>
              <dl className="grid grid-cols-2 gap-3 lg:grid-cols-4">
                <div className="card py-4">
                  <dt className="text-sm text-muted">Panels unanimous</dt>
                  <dd className="stat-value">{pct(o.exact.value)}</dd>
                  <dd className="text-sm text-muted">{o.exact.ci95 ? `95 % CI ${pct(o.exact.ci95[0])} to ${pct(o.exact.ci95[1])}` : ''}</dd>
                </div>
                <div className="card py-4">
                  <dt className="text-sm text-muted">Panels within half a class</dt>
                  <dd className="stat-value">{pct(o.withinHalfClass.value)}</dd>
                  <dd className="text-sm text-muted">{o.withinHalfClass.ci95 ? `95 % CI ${pct(o.withinHalfClass.ci95[0])} to ${pct(o.withinHalfClass.ci95[1])}` : ''}</dd>
                </div>
                <div className="card py-4">
                  <dt className="text-sm text-muted">Assessments in these filters</dt>
                  <dd className="stat-value" data-testid="filtered-assessments">
                    {integer.format(o.counts.assessments)}
                  </dd>
                  <dd className="text-sm text-muted">{integer.format(o.counts.analysable)} with two or more ratings</dd>
                </div>
                <div className="card py-4">
                  <dt className="text-sm text-muted">Ratings in these filters</dt>
                  <dd className="stat-value">{integer.format(o.counts.ratings)}</dd>
                  <dd className="text-sm text-muted">
                    {o.counts.classifiers} classifiers, {o.counts.athletes} athletes
                  </dd>
                </div>
              </dl>
              <p className="text-sm text-muted">
                Bands: {o.sources.landisKoch}. Alpha’s interval: {o.bootstrap.B} bootstrap resamples of assessments (seed {o.bootstrap.seed}). Rule of thumb for alpha:{' '}
                {o.sources.krippendorff}.
              </p>
            </section>
            <TrendChart
              points={o.trend}
              title="Krippendorff’s alpha (ordinal) by quarter"
              yLabel="Alpha (unitless, 1 = perfect)"
              fileName={`${federation.slug}-alpha-by-quarter`}
              summary={
                o.trend.length
                  ? `From ${o.trend[0]!.quarter} to ${o.trend.at(-1)!.quarter}, alpha ranged from ${num(Math.min(...o.trend.map((p) => p.value ?? 1)), 3)} to ${num(
                      Math.max(...o.trend.map((p) => p.value ?? 0)),
                      3,
                    )}. The band is a 95 % bootstrap interval per quarter.`
                  : 'No quarter has data in these filters.'
              }
            />
            {role === 'lead' && o.openFlags ? (
              <section aria-labelledby="open-flags-title" className="card">
                <div className="flex flex-wrap items-baseline gap-3">
                  <h2 id="open-flags-title">Open calibration flags</h2>
                  <Link to="flags" className="ml-auto text-sm font-semibold text-harbour underline">
                    All flags and thresholds
                  </Link>
                </div>
                {o.openFlags.length === 0 ? (
                  <p className="mt-2 text-muted">No open flag.</p>
                ) : (
                  <ul className="mt-3 divide-y divide-line">
                    {o.openFlags.map((f) => (
                      <li key={f.id} className="flex flex-wrap gap-x-3 py-2">
                        <Link to={`classifiers/${encodeURIComponent(f.classifierCode)}${filterSearch}`} className="font-semibold text-harbour underline">
                          {f.classifierCode} {f.classifierName}
                        </Link>
                        <span>{FLAG_RULE_LABELS[f.rule]}</span>
                        <span className="text-muted">{FLAG_STATUS_LABELS[f.status]}</span>
                        <span className="w-full text-sm text-muted">{f.evidence.summary}</span>
                      </li>
                    ))}
                  </ul>
                )}
              </section>
            ) : null}
          </div>
        )}
      </QueryState>
    </PageFrame>
  );
}
