import * as Plot from '@observablehq/plot';
import { Link } from 'react-router';
import { ASSESSMENT_KIND_LABELS, type AssessmentKind } from '../../../../shared/schemas/common';
import { useFilterSearch } from '../../../lib/filter-search';
import { useCurrentFederation } from '../../../lib/use-federation';
import { DataTable } from '../../../components/data-table';
import { CHART_COLORS, INK, PlotFigure } from '../../../components/plot-figure';
import { useClassDrift } from '../api/get-class-drift';
import { useRaterDrift } from '../api/get-rater-drift';
import { MultiLineChart, SeasonDistributionChart } from '../../../components/charts';
import { formatDate } from '../../../lib/format';
import { integer, num, pct, withInterval } from '../../../lib/stat-format';
import { PageFrame, QueryState } from './page-frame';
import { useAnalyticsFilters, type AnalyticsFiltersState } from './use-analytics-filters';

export function DriftPage() {
  const { federation, role } = useCurrentFederation();
  const filters = useAnalyticsFilters();
  return (
    <PageFrame
      title="Drift over time"
      intro={
        role === 'lead'
          ? 'Rater drift: each classifier’s mean deviation from the panel by quarter, with the test for a change in each classifier’s own level. Class drift: how athletes’ classes move between successive assessments, and the class distribution by season.'
          : 'Class drift: how athletes’ classes move between successive assessments, how often reviews and protests changed a class, and the class distribution by season.'
      }
      federation={federation.slug}
      filters={filters}
    >
      {role === 'lead' ? <RaterDrift federation={federation.slug} filters={filters} /> : null}
      <ClassDriftSection federation={federation.slug} filters={filters} />
    </PageFrame>
  );
}

function RaterDrift({ federation, filters }: { federation: string; filters: AnalyticsFiltersState }) {
  const query = useRaterDrift(federation, filters.filters);
  const filterSearch = useFilterSearch();
  return (
    <section aria-labelledby="rater-drift-title" className="space-y-3">
      <h2 id="rater-drift-title">Rater drift</h2>
      <QueryState query={query}>
        {(data) => {
          const changed = data.classifiers
            .filter((c) => c.change?.met)
            .sort((a, b) => (b.change!.changeDate < a.change!.changeDate ? -1 : 1));
          const highlight = changed.slice(0, 4).map((c) => c.code);
          return (
            <>
              <MultiLineChart
                series={data.classifiers.map((c) => ({ name: c.code, points: c.byQuarter }))}
                highlight={highlight}
                title="Each classifier’s mean deviation from the panel by quarter"
                yLabel="Mean deviation (points, + = higher)"
                fileName={`${federation}-rater-drift`}
                summary={`${data.classifiers.length} classifiers. A change in a classifier’s own level (change of at least ${num(data.parameters.driftMin)} point, false-discovery rate ${pct(
                  data.parameters.falseDiscoveryRate,
                )} across the roster) under these filters for ${changed.length}${highlight.length ? `: ${highlight.join(', ')} (in colour)` : ''}.`}
              />
              <details className="text-sm text-muted">
                <summary className="cursor-pointer font-semibold">How this is computed</summary>
                <p className="mt-1">{data.parameters.method}. A steady lean does not count as a change; the lean has its own rule.</p>
              </details>
              <DataTable
                caption="Strongest change of level by classifier"
                filterable
                csvFileName={`${federation}-rater-drift.csv`}
                rowKey={(r) => r.code}
                initialSort={[{ id: 'size', desc: true }]}
                columns={[
                  {
                    key: 'code',
                    header: 'Classifier',
                    cell: (r) => (
                      <Link
                        to={`../classifiers/${encodeURIComponent(r.code)}${filterSearch}`}
                        relative="path"
                        className="font-semibold text-harbour underline"
                      >
                        {r.code}
                      </Link>
                    ),
                  },
                  { key: 'name', header: 'Name' },
                  { key: 'n', header: 'Ratings (n)', align: 'right' },
                  { key: 'date', header: 'Around' },
                  { key: 'size', header: 'Change (points)', align: 'right', cell: (r) => num(r.size) },
                  { key: 'p', header: 'Adjusted p', align: 'right', cell: (r) => num(r.p, 3) },
                  { key: 'met', header: 'Drift rule' },
                  { key: 'latest', header: 'Latest quarter’s deviation (points)', align: 'right', cell: (r) => num(r.latest) },
                ]}
                rows={data.classifiers.map((c) => ({
                  code: c.code,
                  name: c.name ?? '',
                  n: c.n,
                  date: c.change
                    ? `${c.change.changeDate}, ${c.change.direction === 'up' ? 'higher' : c.change.direction === 'down' ? 'lower' : 'level'}`
                    : '',
                  size: c.change ? Math.abs(c.change.size) : null,
                  p: c.change?.pAdjusted ?? null,
                  met: c.change?.met ? 'met' : '',
                  latest: c.byQuarter.at(-1)?.value ?? null,
                }))}
              />
            </>
          );
        }}
      </QueryState>
    </section>
  );
}

function ClassDriftSection({ federation, filters }: { federation: string; filters: AnalyticsFiltersState }) {
  const query = useClassDrift(federation, filters.filters);
  return (
    <section aria-labelledby="class-drift-title" className="space-y-3">
      <h2 id="class-drift-title">Class drift</h2>
      <QueryState query={query}>
        {(data) => {
          const t = data.transitions;
          const cells = t.counts.flatMap((row, i) => row.map((n, j) => ({ from: t.classes[i], to: t.classes[j], n })));
          const max = Math.max(1, ...cells.filter((c) => c.from !== c.to).map((c) => c.n));
          return (
            <>
              <dl className="grid grid-cols-1 gap-3 sm:grid-cols-3">
                <div className="card py-4">
                  <dt className="text-sm text-muted">Successive assessments with a class change</dt>
                  <dd className="stat-value">{pct(t.changed.value, 1)}</dd>
                  <dd className="text-sm text-muted">of {integer.format(t.n)} pairs of successive assessments</dd>
                </div>
                <div className="card py-4">
                  <dt className="text-sm text-muted">Reviews that changed the class</dt>
                  <dd className="stat-value">{pct(t.reviewsChanged.value, 1)}</dd>
                  <dd className="text-sm text-muted">
                    {withInterval(t.reviewsChanged, 3)} · n = {t.reviewsChanged.n}
                  </dd>
                </div>
                <div className="card py-4">
                  <dt className="text-sm text-muted">Protests that changed the class</dt>
                  <dd className="stat-value">{pct(t.protestsChanged.value, 1)}</dd>
                  <dd className="text-sm text-muted">
                    {withInterval(t.protestsChanged, 3)} · n = {t.protestsChanged.n}
                  </dd>
                </div>
              </dl>
              <div className="grid gap-6 xl:grid-cols-2">
                <PlotFigure
                  title="Class at one assessment and at the next"
                  fileName={`${federation}-class-transitions`}
                  deps={[data]}
                  summary={`${integer.format(t.n)} pairs of successive assessments of the same athlete; ${pct(t.changed.value, 1)} changed class. Off the diagonal: changes, shaded by count (the diagonal is not shaded).`}
                  build={(width) => {
                    const size = Math.min(width, 520);
                    return {
                      width: size,
                      height: size,
                      marginLeft: 60,
                      marginBottom: 48,
                      padding: 0.04,
                      x: { label: 'Class at the later assessment (sport class)', domain: t.classes },
                      y: { label: 'Class at the earlier assessment (sport class)', domain: t.classes },
                      color: { type: 'sqrt', domain: [0, max], range: ['#f7f5f0', CHART_COLORS[1]] },
                      marks: [
                        Plot.cell(
                          cells.filter((c) => c.from !== c.to),
                          { x: 'to', y: 'from', fill: 'n', inset: 0.5 },
                        ),
                        Plot.cell(
                          cells.filter((c) => c.from === c.to),
                          { x: 'to', y: 'from', fill: '#e3edf0', inset: 0.5 },
                        ),
                        Plot.text(cells, { x: 'to', y: 'from', text: (c: { n: number }) => (c.n ? String(c.n) : ''), fill: INK }),
                      ],
                    };
                  }}
                />
                <SeasonDistributionChart
                  seasons={data.distribution}
                  classes={t.classes}
                  title="Outcome classes by season"
                  fileName={`${federation}-classes-by-season`}
                  summary={
                    data.distribution.map((d) => `${d.season}: ${integer.format(d.n)} assessments`).join('; ') ||
                    'No season in these filters.'
                  }
                />
              </div>
              {data.changes ? (
                <DataTable
                  caption="Class changes between successive assessments"
                  filterable
                  pageSize={10}
                  csvFileName={`${federation}-class-changes.csv`}
                  columns={[
                    { key: 'athleteCode', header: 'Athlete' },
                    { key: 'from', header: 'From class' },
                    { key: 'to', header: 'To class' },
                    { key: 'on', header: 'Date', cell: (r) => formatDate(r.on) },
                    { key: 'kind', header: 'Assessment', cell: (r) => ASSESSMENT_KIND_LABELS[r.kind as AssessmentKind] ?? r.kind },
                  ]}
                  rows={data.changes}
                />
              ) : null}
            </>
          );
        }}
      </QueryState>
    </section>
  );
}
