import * as Plot from '@observablehq/plot';
import { useSearchParams } from 'react-router';
import type { PairCell } from '../../../../shared/schemas/analytics';
import { useCurrentFederation } from '../../../lib/use-federation';
import { DataTable } from '../../../components/data-table';
import { CHART_COLORS, INK, PlotFigure } from '../../../components/plot-figure';
import { usePair } from '../api/get-pair';
import { usePairs } from '../api/get-pairs';
import { ConfusionChart } from '../../../components/charts';
import { integer, num, pct, withInterval } from '../../../lib/stat-format';
import { PageFrame, QueryState } from './page-frame';
import { useAnalyticsFilters } from './use-analytics-filters';
import type { AnalyticsFilters } from '../../../../shared/schemas/analytics';

interface Cell {
  a: string;
  b: string;
  n: number;
  value: number | null;
  tooFew: boolean;
}

export function PairsPage() {
  const { federation } = useCurrentFederation();
  const filters = useAnalyticsFilters();
  const [params, setParams] = useSearchParams();
  const query = usePairs(federation.slug, filters.filters);
  const selected = params.get('pair')?.split('~') ?? null;
  const open = (a: string, b: string) =>
    setParams(
      (prev) => {
        const next = new URLSearchParams(prev);
        next.set('pair', `${a}~${b}`);
        return next;
      },
      { replace: true },
    );

  return (
    <PageFrame
      title="Pairs of classifiers"
      intro="Cohen’s quadratically weighted kappa of every two classifiers over the assessments they both rated. Pairs with fewer shared assessments than the minimum are shown as “too few”, without a value. Choose a pair to see their classes side by side."
      federation={federation.slug}
      filters={filters}
      showMinShared
    >
      <QueryState query={query}>
        {(data) => {
          const codes = data.classifiers;
          const byPair = new Map(data.pairs.map((p) => [`${p.a}~${p.b}`, p]));
          const cells: Cell[] = [];
          for (const a of codes) {
            for (const b of codes) {
              if (a === b) continue;
              const [x, y] = a < b ? [a, b] : [b, a];
              const p: PairCell | undefined = byPair.get(`${x}~${y}`);
              cells.push({ a, b, n: p?.n ?? 0, value: p?.quadraticKappa?.value ?? null, tooFew: p ? p.tooFew : true });
            }
          }
          const valued = data.pairs.filter((p) => !p.tooFew && p.quadraticKappa?.value !== null);
          const lowest = [...valued].sort((x, y) => x.quadraticKappa!.value! - y.quadraticKappa!.value!).slice(0, 3);
          const tooFew = data.pairs.filter((p) => p.tooFew).length + (codes.length * (codes.length - 1)) / 2 - data.pairs.length;
          return (
            <div className="space-y-6">
              <PlotFigure
                title="Quadratically weighted kappa of each pair of classifiers"
                fileName={`${federation.slug}-pairs-heatmap`}
                deps={[data]}
                onSelect={(d) => {
                  const c = d as Cell;
                  if (c && c.a && c.b) open(c.a, c.b);
                }}
                summary={`${valued.length} pairs have at least ${data.minShared} shared assessments; ${tooFew} have too few. ${
                  lowest.length ? `Lowest: ${lowest.map((p) => `${p.a}–${p.b} ${num(p.quadraticKappa!.value)}`).join(', ')}.` : ''
                } Grey cells with a dash: too few shared assessments. Select a cell to open the pair.`}
                build={(width) => {
                  const size = Math.min(Math.max(width, 360), 760);
                  return {
                    width: size,
                    height: size,
                    marginLeft: 52,
                    marginBottom: 52,
                    padding: 0.05,
                    x: { label: 'Classifier (code)', domain: codes, tickRotate: -90 },
                    y: { label: 'Classifier (code)', domain: codes },
                    color: {
                      type: 'linear',
                      domain: [Math.min(0.8, ...valued.map((p) => p.quadraticKappa!.value!)), 1],
                      range: ['#f3d7b0', CHART_COLORS[0]],
                    },
                    marks: [
                      Plot.cell(
                        cells.filter((c) => c.tooFew),
                        { x: 'a', y: 'b', fill: '#ebe8e1', inset: 0.5 },
                      ),
                      Plot.text(
                        cells.filter((c) => c.tooFew),
                        { x: 'a', y: 'b', text: () => '–', fill: '#5b6b75' },
                      ),
                      Plot.cell(
                        cells.filter((c) => !c.tooFew),
                        { x: 'a', y: 'b', fill: 'value', inset: 0.5 },
                      ),
                      Plot.tip(
                        cells,
                        Plot.pointer({
                          x: 'a',
                          y: 'b',
                          title: (c: Cell) =>
                            c.tooFew
                              ? `${c.a} and ${c.b}: too few shared assessments (${c.n})`
                              : `${c.a} and ${c.b}: κw = ${num(c.value)} over ${c.n}`,
                        }),
                      ),
                    ],
                    style: { color: INK },
                  };
                }}
              >
                <KappaLegend low={Math.min(0.8, ...valued.map((p) => p.quadraticKappa!.value!))} />
              </PlotFigure>
              {selected && selected.length === 2 ? (
                <PairPanel federation={federation.slug} filters={filters.filters} a={selected[0]} b={selected[1]} />
              ) : null}
              <DataTable
                caption="Pairs of classifiers"
                filterable
                csvFileName={`${federation.slug}-pairs.csv`}
                rowKey={(r) => `${r.a}~${r.b}`}
                initialSort={[{ id: 'kappa', desc: false }]}
                columns={[
                  { key: 'a', header: 'Classifier A' },
                  { key: 'b', header: 'Classifier B' },
                  { key: 'n', header: 'Shared assessments', align: 'right' },
                  {
                    key: 'kappa',
                    header: 'Quadratic kappa',
                    align: 'right',
                    cell: (r) => (r.tooFew ? <span className="text-muted">too few</span> : num(r.kappa)),
                    csv: (r) => (r.tooFew ? 'too few' : r.kappa),
                  },
                  {
                    key: 'exact',
                    header: 'Same class',
                    align: 'right',
                    cell: (r) => (r.tooFew ? '' : pct(r.exact)),
                    csv: (r) => (r.tooFew ? '' : r.exact),
                  },
                  {
                    key: 'open',
                    header: 'Details',
                    sortable: false,
                    cell: (r) => (
                      <button type="button" className="text-sm font-semibold text-harbour underline" onClick={() => open(r.a, r.b)}>
                        Classes of {r.a} and {r.b}
                      </button>
                    ),
                    csv: () => '',
                  },
                ]}
                rows={data.pairs.map((p) => ({
                  a: p.a,
                  b: p.b,
                  n: p.n,
                  tooFew: p.tooFew,
                  kappa: p.quadraticKappa?.value ?? undefined,
                  exact: p.exact?.value ?? undefined,
                  open: '',
                }))}
              />
            </div>
          );
        }}
      </QueryState>
    </PageFrame>
  );
}

function PairPanel({ federation, filters, a, b }: { federation: string; filters: AnalyticsFilters; a: string; b: string }) {
  const query = usePair(federation, filters, a, b);
  return (
    <section aria-labelledby="pair-title" className="space-y-3">
      <h2 id="pair-title">
        {a} and {b}
      </h2>
      <QueryState query={query}>
        {(p) => (
          <div className="grid gap-6 xl:grid-cols-2">
            <ConfusionChart
              confusion={p.confusion}
              title={`Classes given by ${a} and ${b} to the same athletes`}
              xLabel={`Class given by ${b} (sport class)`}
              yLabel={`Class given by ${a} (sport class)`}
              fileName={`${federation}-${a}-${b}-confusion`}
              summary={`${integer.format(p.n)} shared assessments; ${pct(p.n ? p.confusion.counts.reduce((s, r, i) => s + r[i], 0) / p.n : null)} with the same class.`}
            />
            <div className="card space-y-2">
              <h3>Agreement of the pair</h3>
              {p.tooFew || !p.stats ? (
                <p className="text-muted">
                  Too few shared assessments ({p.n}, minimum {p.minShared}) for an agreement value.
                </p>
              ) : (
                <dl className="space-y-1 text-sm" data-testid="pair-headline">
                  <div>
                    <dt className="inline font-semibold">Same class: </dt>
                    <dd className="inline">{withInterval(p.stats.exact)}</dd>
                  </div>
                  <div>
                    <dt className="inline font-semibold">Points apart per 100 shared assessments: </dt>
                    <dd className="inline">
                      {num(p.stats.pointsApart.per100, 0)} (mean {num(p.stats.pointsApart.meanAbs.value)} point;{' '}
                      {pct(p.stats.pointsApart.offByHalf.value)} half a class or more apart)
                    </dd>
                  </div>
                  <div>
                    <dt className="inline font-semibold">Half-point splits: </dt>
                    <dd className="inline">
                      {p.stats.splits
                        .filter((s) => s.touching >= 5 && (s.splitRate ?? 0) > 0)
                        .sort((x, y) => (y.splitRate ?? 0) - (x.splitRate ?? 0))
                        .slice(0, 3)
                        .map((s) => `${s.lower}/${s.upper} ${pct(s.splitRate)} of ${s.touching}`)
                        .join(' · ') || 'none near any boundary'}
                    </dd>
                  </div>
                  <div>
                    <dt className="inline font-semibold">Cohen’s kappa (unweighted): </dt>
                    <dd className="inline">{withInterval(p.stats.kappa)}</dd>
                  </div>
                  <div>
                    <dt className="inline font-semibold">Gwet’s AC1: </dt>
                    <dd className="inline">{withInterval(p.stats.ac1)}</dd>
                  </div>
                  <div>
                    <dt className="inline font-semibold">Within half a class (counts a half-class miss as agreement): </dt>
                    <dd className="inline">{withInterval(p.stats.withinHalfClass)}</dd>
                  </div>
                  <div>
                    <dt className="inline font-semibold">Linearly weighted kappa (counts a half-class miss as 6/7 of an agreement): </dt>
                    <dd className="inline">{withInterval(p.stats.linearKappa)}</dd>
                  </div>
                  <div>
                    <dt className="inline font-semibold">Quadratically weighted kappa (counts a half-class miss as near agreement): </dt>
                    <dd className="inline">{withInterval(p.stats.quadraticKappa)}</dd>
                  </div>
                </dl>
              )}
            </div>
          </div>
        )}
      </QueryState>
    </section>
  );
}

function KappaLegend({ low }: { low: number }) {
  return (
    <div className="flex flex-wrap items-center gap-3 text-sm" aria-label="Colour key">
      <span>Quadratic kappa</span>
      <span className="flex items-center gap-1">
        {num(low)}
        <span
          aria-hidden="true"
          className="inline-block h-3 w-28 rounded-sm"
          style={{ background: `linear-gradient(to right, #f3d7b0, ${CHART_COLORS[0]})` }}
        />
        1.00
      </span>
      <span className="flex items-center gap-1">
        <span aria-hidden="true" className="inline-block h-3 w-3 rounded-sm border border-line" style={{ background: '#ebe8e1' }} />– too
        few shared assessments
      </span>
    </div>
  );
}
