import { useCurrentFederation } from '../../../lib/use-federation';
import { DataTable } from '../../../components/data-table';
import { useBoundaries } from '../api/get-boundaries';
import { BoundaryBars, BoundaryTrend } from '../../../components/charts';
import { pct } from '../../../lib/stat-format';
import { PageFrame, QueryState } from './page-frame';
import { useAnalyticsFilters } from './use-analytics-filters';

export function BoundariesPage() {
  const { federation } = useCurrentFederation();
  const filters = useAnalyticsFilters();
  const query = useBoundaries(federation.slug, filters.filters);
  return (
    <PageFrame
      title="Class boundaries"
      intro="For each pair of neighbouring classes, the share of panels with a rating in either class that split between them. A high split rate marks a boundary where calibration material may help most."
      federation={federation.slug}
      filters={filters}
    >
      <QueryState query={query}>
        {(data) => {
          const ranked = [...data.boundaries].filter((b) => b.splitRate !== null).sort((a, b) => b.splitRate! - a.splitRate!);
          return (
            <div className="space-y-6">
              <BoundaryBars
                bars={data.boundaries.map((b) => ({
                  boundary: `${b.lower}/${b.upper}`,
                  value: b.splitRate,
                  lo: b.ci95?.[0] ?? null,
                  hi: b.ci95?.[1] ?? null,
                  n: b.n,
                }))}
                title="Panels split across each class boundary"
                fileName={`${federation.slug}-boundaries`}
                summary={
                  ranked.length
                    ? `Highest split rates: ${ranked
                        .slice(0, 3)
                        .map((b) => `${b.lower}/${b.upper} ${pct(b.splitRate)} of ${b.n}`)
                        .join(
                          ', ',
                        )}; lowest: ${ranked.at(-1)!.lower}/${ranked.at(-1)!.upper} ${pct(ranked.at(-1)!.splitRate)}. Lines are 95 % Wilson intervals.`
                    : 'No panel of two or more in these filters.'
                }
              />
              <BoundaryTrend
                trend={data.trend}
                title="Split rate of each boundary by quarter"
                fileName={`${federation.slug}-boundaries-by-quarter`}
                summary="One panel per boundary; each point is the share of that quarter’s panels touching the boundary that split across it."
              />
              <DataTable
                caption="Split rate by class boundary"
                csvFileName={`${federation.slug}-boundaries.csv`}
                rowKey={(r) => r.boundary}
                columns={[
                  { key: 'boundary', header: 'Boundary' },
                  { key: 'n', header: 'Panels touching', align: 'right' },
                  { key: 'splits', header: 'Split', align: 'right' },
                  { key: 'rate', header: 'Split rate', align: 'right', cell: (r) => pct(r.rate, 1) },
                  { key: 'ci', header: '95 % interval', align: 'right' },
                ]}
                rows={data.boundaries.map((b) => ({
                  boundary: `${b.lower}/${b.upper}`,
                  n: b.n,
                  splits: b.splits,
                  rate: b.splitRate,
                  ci: b.ci95 ? `${pct(b.ci95[0], 1)} to ${pct(b.ci95[1], 1)}` : '',
                }))}
              />
            </div>
          );
        }}
      </QueryState>
    </PageFrame>
  );
}
