import { Link } from 'react-router';
import { FLAG_RULE_LABELS, FLAG_STATUS_LABELS, type Coefficient, type Overview } from '../../../../shared/schemas/analytics';
import { useFilterSearch } from '../../../lib/filter-search';
import { useCurrentFederation } from '../../../lib/use-federation';
import { DataTable } from '../../../components/data-table';
import { TrendChart } from '../../../components/charts';
import { FlagLapse } from '../../dashboards/components/flag-lapse';
import { integer, num, pct } from '../../../lib/stat-format';
import { PageFrame, QueryState } from '../../dashboards/components/page-frame';
import { useAnalyticsFilters } from '../../dashboards/components/use-analytics-filters';
import { useOverview } from '../api/get-overview';
import { SummaryCounts } from './summary-counts';

const NOTE_WORDS = {
  reliable: 'reliable (α ≥ 0.800)',
  tentative: 'tentative conclusions only (0.667 ≤ α < 0.800)',
  unreliable: 'not to be relied on (α < 0.667)',
} as const;
const CI_WORDS: Record<string, string> = {
  'bootstrap-percentile': 'bootstrap percentile',
  'wald-null-se': 'Wald, null SE',
  wald: 'Wald',
  wilson: 'Wilson',
};

type Labelled = Overview['fleissKappa'] | Overview['gwet']['ac1'];

function ChanceCorrected({ heading, stat, testId, note }: { heading: string; stat: Labelled; testId: string; note: string }) {
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
            <span className="text-muted"> ({CI_WORDS[stat.ciMethod ?? ''] ?? stat.ciMethod})</span>
          </>
        ) : (
          <span className="text-muted">{stat.reason ?? 'no interval'}</span>
        )}
      </p>
      <p className="text-sm">
        Band: <strong>{stat.label ?? '—'}</strong> <span className="text-muted">(Landis &amp; Koch 1977)</span>
      </p>
      <p className="text-sm text-muted">{note}</p>
    </div>
  );
}

function Headline({ o }: { o: Overview }) {
  const h = o.headline;
  const splits = [...h.splits].filter((b) => b.splitRate !== null && b.n >= 5).sort((a, b) => (b.splitRate ?? 0) - (a.splitRate ?? 0));
  const stake = h.pointsAtStake;
  return (
    <section aria-labelledby="headline-title" className="space-y-3" data-testid="headline">
      <h2 id="headline-title">Same class, half-point splits and points at stake</h2>
      <dl className="grid grid-cols-2 gap-3 lg:grid-cols-4">
        <div className="card py-4">
          <dt className="text-sm text-muted">Panels unanimous (same class)</dt>
          <dd className="stat-value" data-testid="same-class-unanimous">
            {pct(h.panelsUnanimous.value)}
          </dd>
          <dd className="text-sm text-muted">
            of {integer.format(h.panelsUnanimous.n)} assessments with two or more ratings
            {h.panelsUnanimous.ci95 ? ` · 95 % CI ${pct(h.panelsUnanimous.ci95[0])} to ${pct(h.panelsUnanimous.ci95[1])}` : ''}
          </dd>
        </div>
        <div className="card py-4">
          <dt className="text-sm text-muted">Same class, pairs of members</dt>
          <dd className="stat-value" data-testid="same-class-pairwise">
            {pct(h.pairwiseSameClass.value)}
          </dd>
          <dd className="text-sm text-muted">share of pairs in a panel giving the same class, averaged over assessments</dd>
        </div>
        <div className="card py-4">
          <dt className="text-sm text-muted">Points at stake per 100 ratings</dt>
          <dd className="stat-value" data-testid="points-at-stake">
            {num(stake.per100, 0)}
          </dd>
          <dd className="text-sm text-muted">
            mean {num(stake.meanAbs.value)} point from the panel’s final class over {integer.format(stake.n)} ratings
          </dd>
        </div>
        <div className="card py-4">
          <dt className="text-sm text-muted">Ratings off by half a class or more</dt>
          <dd className="stat-value" data-testid="off-by-half">
            {pct(stake.offByHalf.value, 1)}
          </dd>
          <dd className="text-sm text-muted">
            {stake.offByHalf.ci95 ? `95 % CI ${pct(stake.offByHalf.ci95[0], 1)} to ${pct(stake.offByHalf.ci95[1], 1)}` : ''}
          </dd>
        </div>
      </dl>
      <div className="card">
        <h3 className="text-base">Half-point splits by class boundary</h3>
        <p className="text-sm text-muted">
          Share of assessments touching either class whose panel had ratings on both sides of the boundary.
        </p>
        <ul className="mt-2 grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4" data-testid="boundary-splits">
          {h.splits.map((b) => (
            <li key={b.lower}>
              <strong>
                {b.lower}/{b.upper}
              </strong>{' '}
              {pct(b.splitRate)}{' '}
              <span className="text-muted">
                ({integer.format(b.splits)} of {integer.format(b.n)})
              </span>
            </li>
          ))}
        </ul>
        {splits.length ? (
          <p className="mt-2 text-sm">
            Most often split:{' '}
            {splits
              .slice(0, 2)
              .map((b) => `${b.lower}/${b.upper}`)
              .join(' and ')}
            .
          </p>
        ) : null}
      </div>
      <p className="text-sm text-muted">
        In this sport half a class changes who may play under a team’s point limit, so these figures come first. Points at stake is our own
        figure: the mean distance of a rating from the panel’s final class in sport-class points, ×100. They describe consistency between
        classifiers, not whether any athlete’s class is right.
      </p>
    </section>
  );
}

function CoefficientsTable({ rows, federation }: { rows: Coefficient[]; federation: string }) {
  return (
    <DataTable
      caption="Every coefficient, with its interval and what it measures"
      csvFileName={`${federation}-coefficients.csv`}
      rowKey={(r) => r.id}
      columns={[
        { key: 'name', header: 'Coefficient' },
        { key: 'value', header: 'Value', align: 'right', cell: (r) => num(r.value, 3) },
        { key: 'ci', header: '95 % interval', cell: (r) => (r.ci ? r.ci : <span className="text-muted">{r.reason ?? '—'}</span>) },
        { key: 'n', header: 'n', align: 'right' },
        { key: 'method', header: 'Interval method' },
        { key: 'measures', header: 'What it measures' },
        { key: 'forgives', header: 'What it forgives' },
        { key: 'reading', header: 'Published reading' },
      ]}
      rows={rows.map((r) => ({
        id: r.id,
        name: r.name,
        value: r.value,
        ci: r.ci95 ? `${num(r.ci95[0], 3)} to ${num(r.ci95[1], 3)}` : '',
        reason: r.reason ?? null,
        n: r.n,
        method: r.ciMethod ? (CI_WORDS[r.ciMethod] ?? r.ciMethod) : '',
        measures: r.measures,
        forgives: r.forgives ?? '',
        reading: r.interpretation ? `${r.interpretation.label} (${r.interpretation.source.split(',')[0]})` : '',
      }))}
    />
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
      intro="How consistently the federation’s panels classify: same-class agreement and points at stake first, then the coefficients, the trend by quarter and the open calibration flags."
      federation={federation.slug}
      filters={filters}
    >
      <SummaryCounts federation={federation.slug} />
      <QueryState query={overview}>
        {(o) => (
          <div className="space-y-6">
            <Headline o={o} />
            <section aria-labelledby="reliability-title" className="space-y-3">
              <h2 id="reliability-title">Beyond chance (unweighted)</h2>
              <div className="grid gap-3 md:grid-cols-2">
                <ChanceCorrected
                  heading={o.fleissKappa.name}
                  stat={o.fleissKappa}
                  testId="fleiss-value"
                  note="Same-class agreement beyond what the class shares would give by chance."
                />
                <ChanceCorrected
                  heading="Gwet’s AC1"
                  stat={o.gwet.ac1}
                  testId="ac1-value"
                  note="Like kappa, with a chance term that uneven class shares (many 1.0s, few 2.0s) do not inflate."
                />
              </div>
              <h2 id="weighted-title">With partial credit for near misses (weighted)</h2>
              <dl className="grid grid-cols-1 gap-3 md:grid-cols-3">
                <div className="card py-4">
                  <dt className="text-sm text-muted">
                    Krippendorff’s alpha (ordinal) — counts a miss between neighbouring classes as small
                  </dt>
                  <dd className="stat-value" data-testid="alpha-value">
                    {num(o.alpha.value, 3)}
                  </dd>
                  <dd className="text-sm text-muted">
                    {o.alpha.ci95
                      ? `95 % CI ${num(o.alpha.ci95[0], 3)} to ${num(o.alpha.ci95[1], 3)} (${CI_WORDS[o.alpha.ciMethod ?? ''] ?? o.alpha.ciMethod}). `
                      : ''}
                    {o.alpha.note ? `Krippendorff (2004): ${NOTE_WORDS[o.alpha.note]}.` : ''}
                  </dd>
                </div>
                <div className="card py-4">
                  <dt className="text-sm text-muted">Gwet’s AC2, quadratic — counts a half-class miss as near agreement</dt>
                  <dd className="stat-value">{num(o.gwet.ac2Quadratic.value, 3)}</dd>
                  <dd className="text-sm text-muted">Linear weights (a half-class miss counts 6/7): {num(o.gwet.ac2Linear.value, 3)}</dd>
                </div>
                <div className="card py-4">
                  <dt className="text-sm text-muted">Panels within half a class — counts a half-class miss as agreement</dt>
                  <dd className="stat-value">{pct(o.withinHalfClass.value)}</dd>
                  <dd className="text-sm text-muted">
                    {o.withinHalfClass.ci95 ? `95 % CI ${pct(o.withinHalfClass.ci95[0])} to ${pct(o.withinHalfClass.ci95[1])}` : ''}
                  </dd>
                </div>
              </dl>
              <dl className="grid grid-cols-2 gap-3">
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
            </section>
            <section aria-labelledby="coefficients-title" className="space-y-2">
              <h2 id="coefficients-title">Coefficients</h2>
              <CoefficientsTable rows={o.coefficients} federation={federation.slug} />
              <details className="text-sm text-muted">
                <summary className="cursor-pointer font-semibold">How this is computed</summary>
                <p className="mt-1">
                  Intervals: {o.bootstrap.B} bootstrap resamples of assessments (seed {o.bootstrap.seed}) where the method says bootstrap;
                  otherwise the coefficient’s own large-sample interval. Readings are given only where the coefficient has its own published
                  one: {o.sources.landisKoch} for kappa-type coefficients; {o.sources.krippendorff} for alpha. The authors call their bands
                  benchmarks, not tests.
                </p>
              </details>
            </section>
            <TrendChart
              points={o.trend}
              title="Krippendorff’s alpha (ordinal) by quarter"
              yLabel="Alpha (unitless, 1 = perfect)"
              fileName={`${federation.slug}-alpha-by-quarter`}
              summary={
                o.trend.length
                  ? `From ${o.trend[0].quarter} to ${o.trend.at(-1)!.quarter}, alpha ranged from ${num(Math.min(...o.trend.map((p) => p.value ?? 1)), 3)} to ${num(
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
                        <Link
                          to={`classifiers/${encodeURIComponent(f.classifierCode)}${filterSearch}`}
                          className="font-semibold text-harbour underline"
                        >
                          {f.classifierCode} {f.classifierName}
                        </Link>
                        <span>{FLAG_RULE_LABELS[f.rule]}</span>
                        <span className="text-muted">
                          {f.stillMet ? FLAG_STATUS_LABELS[f.status] : `${FLAG_STATUS_LABELS[f.status]}, no longer met`}
                        </span>
                        <span className="w-full">
                          <FlagLapse flag={f} />
                        </span>
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
